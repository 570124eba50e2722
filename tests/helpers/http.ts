// A tiny cookie-jar HTTP client for integration tests: keeps the session cookie, fetches the
// CSRF token first and sends it on POST/PATCH/PUT/DELETE (unless a test asks it not to).
export interface HttpResult<T = any> {
  status: number;
  body: T;
  headers: Headers;
}

export interface RequestOptions {
  /** false: send no x-csrf-token header; a string: send that token instead of the session's. */
  csrf?: boolean | string;
  headers?: Record<string, string>;
  /** Send this exact string as the body (for malformed JSON tests). */
  rawBody?: string;
}

export interface Client {
  baseUrl: string;
  request<T = any>(method: string, path: string, body?: unknown, opts?: RequestOptions): Promise<HttpResult<T>>;
  get<T = any>(path: string, opts?: RequestOptions): Promise<HttpResult<T>>;
  post<T = any>(path: string, body?: unknown, opts?: RequestOptions): Promise<HttpResult<T>>;
  patch<T = any>(path: string, body?: unknown, opts?: RequestOptions): Promise<HttpResult<T>>;
  put<T = any>(path: string, body?: unknown, opts?: RequestOptions): Promise<HttpResult<T>>;
  del<T = any>(path: string, opts?: RequestOptions): Promise<HttpResult<T>>;
  /** GET /api/auth/csrf and remember the token. */
  fetchCsrf(): Promise<string>;
  signIn(email: string, password: string): Promise<HttpResult>;
  signOut(): Promise<HttpResult>;
  cookie(name: string): string | undefined;
  /** The raw Cookie header this client sends. */
  cookieHeader(): string;
  /** Forget cookies and the CSRF token (a fresh anonymous visitor). */
  reset(): void;
}

export function createClient(baseUrl: string): Client {
  const jar = new Map<string, string>();
  let csrf: string | null = null;

  const cookieHeader = () => [...jar].map(([k, v]) => `${k}=${v}`).join('; ');

  function remember(headers: Headers) {
    for (const line of headers.getSetCookie()) {
      const [pair, ...attrs] = line.split(';');
      const eq = pair.indexOf('=');
      const name = pair.slice(0, eq).trim();
      const value = pair.slice(eq + 1).trim();
      const expired = attrs.some((a) => /^\s*expires=/i.test(a) && new Date(a.split('=')[1]).getTime() < Date.now()) || value === '';
      if (expired) jar.delete(name);
      else jar.set(name, value);
    }
  }

  async function request<T = any>(method: string, path: string, body?: unknown, opts: RequestOptions = {}): Promise<HttpResult<T>> {
    const headers: Record<string, string> = { Accept: 'application/json', ...(opts.headers ?? {}) };
    if (jar.size) headers.Cookie = cookieHeader();
    const changing = !['GET', 'HEAD', 'OPTIONS'].includes(method.toUpperCase());
    if (changing && opts.csrf !== false) {
      headers['x-csrf-token'] = typeof opts.csrf === 'string' ? opts.csrf : (csrf ?? (await fetchCsrf()));
      if (jar.size) headers.Cookie = cookieHeader();
    }
    let payload: string | undefined;
    if (opts.rawBody !== undefined) payload = opts.rawBody;
    else if (body !== undefined) payload = JSON.stringify(body);
    if (payload !== undefined) headers['Content-Type'] ??= 'application/json';
    const res = await fetch(`${baseUrl}${path}`, { method, headers, body: payload, redirect: 'manual' });
    remember(res.headers);
    if ((res.headers.get('content-type') ?? '').startsWith('text/event-stream')) {
      // An endless stream (Server-Sent Events): the status and headers are the answer.
      await res.body?.cancel();
      return { status: res.status, body: null as T, headers: res.headers };
    }
    const text = await res.text();
    let parsed: unknown = text;
    if ((res.headers.get('content-type') ?? '').includes('application/json') && text) parsed = JSON.parse(text);
    return { status: res.status, body: parsed as T, headers: res.headers };
  }

  async function fetchCsrf(): Promise<string> {
    const r = await request<{ csrfToken: string }>('GET', '/api/auth/csrf');
    if (r.status !== 200) throw new Error(`GET /api/auth/csrf answered ${r.status}`);
    csrf = r.body.csrfToken;
    return csrf;
  }

  return {
    baseUrl,
    request,
    get: (path, opts) => request('GET', path, undefined, opts),
    post: (path, body, opts) => request('POST', path, body, opts),
    patch: (path, body, opts) => request('PATCH', path, body, opts),
    put: (path, body, opts) => request('PUT', path, body, opts),
    del: (path, opts) => request('DELETE', path, undefined, opts),
    fetchCsrf,
    async signIn(email, password) {
      await fetchCsrf();
      const r = await request('POST', '/api/auth/sign-in', { email, password });
      if (r.status === 200) csrf = (r.body as { csrfToken: string }).csrfToken;
      return r;
    },
    async signOut() {
      const r = await request('POST', '/api/auth/sign-out', {});
      csrf = null;
      return r;
    },
    cookie: (name) => jar.get(name),
    cookieHeader,
    reset() {
      jar.clear();
      csrf = null;
    },
  };
}
