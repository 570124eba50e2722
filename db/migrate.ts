// Applies the drizzle-kit migrations in db/migrations to DATABASE_URL. Exit 0 when up to date.
import path from 'node:path';
import { migrate } from 'drizzle-orm/node-postgres/migrator';
import { createDb, createPool, DEFAULT_DATABASE_URL } from './client';

export const MIGRATIONS_FOLDER = path.join(__dirname, 'migrations');

export async function runMigrations(databaseUrl: string): Promise<void> {
  const pool = createPool(databaseUrl, { max: 1, connectionTimeoutMillis: 10_000 });
  try {
    await migrate(createDb(pool), { migrationsFolder: MIGRATIONS_FOLDER });
  } finally {
    await pool.end();
  }
}

if (require.main === module) {
  const url = process.env.DATABASE_URL ?? DEFAULT_DATABASE_URL;
  runMigrations(url).then(
    () => {
      console.log(`[migrate] ${new URL(url).pathname.slice(1)} is up to date`);
      process.exit(0);
    },
    (err: unknown) => {
      console.error(`[migrate] failed: ${err instanceof Error ? err.message : String(err)}`);
      process.exit(1);
    },
  );
}
