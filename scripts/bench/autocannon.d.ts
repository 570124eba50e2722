// The part of autocannon 8's API the benchmarks use (the package ships no type declarations).
declare module 'autocannon' {
  interface AutocannonOptions {
    url: string;
    connections?: number;
    /** Seconds. */
    duration?: number;
    headers?: Record<string, string>;
    /** Seconds before a request counts as timed out. */
    timeout?: number;
    method?: string;
    body?: string;
  }
  interface AutocannonResult {
    requests: { total: number; average: number };
    non2xx: number;
    errors: number;
    timeouts: number;
  }
  /** A running benchmark: awaitable for its result; 'response' fires for every answer (ms). */
  interface AutocannonInstance extends PromiseLike<AutocannonResult> {
    on(event: 'response', listener: (client: unknown, statusCode: number, resBytes: number, responseTime: number) => void): this;
    stop(): void;
  }
  function autocannon(opts: AutocannonOptions): AutocannonInstance;
  export = autocannon;
}
