// The server serves the web export from WEB_DIST with an index.html fallback for client-side
// routes, while unknown API paths stay JSON 404s.
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startStack, type Stack } from '../helpers/stack';

let stack: Stack;
let dist: string;
beforeAll(async () => {
  dist = fs.mkdtempSync(path.join(os.tmpdir(), 'keel-dist-'));
  fs.writeFileSync(path.join(dist, 'index.html'), '<!doctype html><title>Keel</title><div id="root"></div><script src="/_expo/static/js/web/entry.js" defer></script>');
  fs.mkdirSync(path.join(dist, '_expo', 'static', 'js', 'web'), { recursive: true });
  fs.writeFileSync(path.join(dist, '_expo', 'static', 'js', 'web', 'entry.js'), 'console.log("keel")');
  stack = await startStack({ worker: false, mailSink: false, env: { WEB_DIST: dist } });
});
afterAll(async () => {
  await stack?.stop();
  fs.rmSync(dist, { recursive: true, force: true });
});

describe('web export', () => {
  it('serves files, and index.html for client-side routes', async () => {
    const js = await fetch(`${stack.baseUrl}/_expo/static/js/web/entry.js`);
    expect(js.status).toBe(200);
    expect(js.headers.get('content-type')).toMatch(/javascript/);
    expect(await js.text()).toBe('console.log("keel")');
    for (const route of ['/', '/network/tracks', '/accept-invite?token=abc']) {
      const r = await fetch(`${stack.baseUrl}${route}`);
      expect(r.status, route).toBe(200);
      expect(r.headers.get('content-type')).toMatch(/text\/html/);
      expect(await r.text()).toContain('<div id="root"></div>');
      expect(r.headers.get('content-security-policy')).toContain("script-src 'self'");
    }
  });

  it('keeps unknown API paths as JSON 404', async () => {
    const r = await fetch(`${stack.baseUrl}/api/nothing/here`);
    expect(r.status).toBe(404);
    expect(await r.json()).toEqual({ error: { code: 'NOT_FOUND', message: 'No API route GET /api/nothing/here' } });
  });
});
