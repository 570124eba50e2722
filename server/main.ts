// `tsx server/main.ts`: the HTTP server (API + web export). Exits cleanly on SIGTERM / SIGINT.
import http from 'node:http';
import { createApp } from './app';
import { ConfigError, loadConfig } from './config';
import { consoleLogger, createDeps } from './deps';

const log = consoleLogger('server');

async function main(): Promise<void> {
  const config = loadConfig();
  const deps = createDeps(config, log);
  const keel = createApp(deps);
  const server = http.createServer(keel.app);
  // Keep-alive sockets would hold close() open; end idle ones when asked to stop.
  server.keepAliveTimeout = 5000;
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(config.port, config.host, () => resolve());
  });
  log.info(`listening on http://${config.host}:${config.port} (web export from ${config.webDist})`);

  let stopping = false;
  const stop = async (signal: string) => {
    if (stopping) return;
    stopping = true;
    log.info(`${signal}: closing`);
    const force = setTimeout(() => {
      log.warn('did not close within 10 s; exiting');
      process.exit(1);
    }, 10_000);
    await new Promise<void>((resolve) => {
      server.close(() => resolve());
      server.closeIdleConnections();
    });
    await keel.close();
    await deps.close();
    clearTimeout(force);
    process.exit(0);
  };
  process.on('SIGTERM', () => void stop('SIGTERM'));
  process.on('SIGINT', () => void stop('SIGINT'));
}

main().catch((err: unknown) => {
  log.error(err instanceof ConfigError ? err.message : 'failed to start', err instanceof ConfigError ? undefined : err);
  process.exit(1);
});
