// `tsx server/mail-sink-main.ts`: the fake SMTP server on SMTP_HOST:SMTP_PORT (loopback by
// default). Exits cleanly on SIGTERM / SIGINT.
import { createDb, createPool } from '../db/client';
import { ConfigError, loadConfig } from './config';
import { consoleLogger } from './deps';
import { createMailSink } from './mail-sink';

const log = consoleLogger('mail');

async function main(): Promise<void> {
  const config = loadConfig();
  const pool = createPool(config.databaseUrl, { max: 4, onError: (e) => log.warn(`database connection lost: ${e.message}`) });
  const sink = createMailSink({ db: createDb(pool), log });
  const port = await sink.listen(config.smtpPort, config.smtpHost);
  log.info(`mail sink listening on ${config.smtpHost}:${port}`);
  let stopping = false;
  const stop = async (signal: string) => {
    if (stopping) return;
    stopping = true;
    log.info(`${signal}: closing`);
    await sink.close();
    await pool.end().catch(() => undefined);
    process.exit(0);
  };
  process.on('SIGTERM', () => void stop('SIGTERM'));
  process.on('SIGINT', () => void stop('SIGINT'));
}

main().catch((err: unknown) => {
  log.error(err instanceof ConfigError ? err.message : 'failed to start', err instanceof ConfigError ? undefined : err);
  process.exit(1);
});
