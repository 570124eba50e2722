// Migrations only from `npx drizzle-kit generate --name <what_it_does>`; applied by db/migrate.ts.
import { defineConfig } from 'drizzle-kit';

export default defineConfig({
  schema: './db/schema.ts',
  out: './db/migrations',
  dialect: 'postgresql',
  // connect-pg-simple's table is created by our first migration but its rows are the store's own:
  // keep push/introspection away from it.
  tablesFilter: ['!session'],
  dbCredentials: { url: process.env.DATABASE_URL ?? 'postgresql://postgres@127.0.0.1:54329/keel' },
  strict: true,
  verbose: true,
});
