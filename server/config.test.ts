import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { ConfigError, DEV_SESSION_SECRET, loadConfig } from './config';

describe('configuration', () => {
  it('has safe development defaults', () => {
    const warnings: string[] = [];
    const c = loadConfig({}, (m) => warnings.push(m));
    expect(c).toMatchObject({
      host: '127.0.0.1',
      port: 8080,
      smtpHost: '127.0.0.1',
      smtpPort: 2525,
      appUrl: 'http://127.0.0.1:8080',
      queuePrefix: 'keel',
      cookieSecure: false,
      production: false,
      sessionSecret: DEV_SESSION_SECRET,
      readCacheMs: 1000,
    });
    expect(c.webDist).toBe(path.resolve(__dirname, '..', 'dist'));
    expect(warnings).toEqual([]);
  });

  it('reads the environment (empty variables count as unset)', () => {
    const c = loadConfig({ PORT: '9090', HOST: '', APP_URL: 'https://keel.tarrow.example/', COOKIE_SECURE: '1', QUEUE_PREFIX: 'keel-t-1', SMTP_PORT: '2626' });
    expect(c.port).toBe(9090);
    expect(c.host).toBe('127.0.0.1');
    expect(c.appUrl).toBe('https://keel.tarrow.example');
    expect(c.cookieSecure).toBe(true);
    expect(c.queuePrefix).toBe('keel-t-1');
    expect(c.smtpPort).toBe(2626);
    expect(loadConfig({ READ_CACHE_MS: '0' }).readCacheMs).toBe(0);
  });

  it('refuses bad values, naming the variable', () => {
    expect(() => loadConfig({ PORT: 'eighty' })).toThrow(ConfigError);
    expect(() => loadConfig({ PORT: 'eighty' })).toThrow(/PORT: PORT must be a number/);
    expect(() => loadConfig({ PORT: '70000' })).toThrow(/PORT must be 0\.\.65535/);
    expect(() => loadConfig({ APP_URL: 'not a url' })).toThrow(/APP_URL: APP_URL must be a URL/);
    expect(() => loadConfig({ COOKIE_SECURE: 'maybe' })).toThrow(/COOKIE_SECURE/);
    expect(() => loadConfig({ READ_CACHE_MS: 'soon' })).toThrow('Bad configuration:\n  READ_CACHE_MS: READ_CACHE_MS must be a number of milliseconds');
    expect(() => loadConfig({ READ_CACHE_MS: '1.5' })).toThrow('Bad configuration:\n  READ_CACHE_MS: READ_CACHE_MS must be a whole number of milliseconds');
    expect(() => loadConfig({ READ_CACHE_MS: '60000' })).toThrow('Bad configuration:\n  READ_CACHE_MS: READ_CACHE_MS must be 0..10000');
  });

  it('refuses to run in production with the development session secret (it is in the repository)', () => {
    const warnings: string[] = [];
    expect(() => loadConfig({ NODE_ENV: 'production' }, (m) => warnings.push(m))).toThrow(ConfigError);
    expect(() => loadConfig({ NODE_ENV: 'production', SESSION_SECRET: DEV_SESSION_SECRET })).toThrow(
      /SESSION_SECRET: NODE_ENV is production but SESSION_SECRET is the development default/,
    );
    expect(warnings).toEqual([]);
    // outside production the development default is the intended safe default
    expect(loadConfig({ NODE_ENV: 'test' }, () => undefined).sessionSecret).toBe(DEV_SESSION_SECRET);
  });

  it('warns when a production secret is short, and is quiet with a long one', () => {
    const short: string[] = [];
    loadConfig({ NODE_ENV: 'production', SESSION_SECRET: 'short-secret-1' }, (m) => short.push(m));
    expect(short).toEqual(['[config] SESSION_SECRET is short: use at least 32 random characters in production']);
    const none: string[] = [];
    loadConfig({ NODE_ENV: 'production', SESSION_SECRET: 'x'.repeat(40) }, (m) => none.push(m));
    expect(none).toEqual([]);
  });
});
