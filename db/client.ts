// PostgreSQL pool and the Drizzle handle. Query functions elsewhere in db/ take (db, params) with
// `db` either this handle or a transaction, so callers decide the transaction boundaries.
import { drizzle, type NodePgDatabase } from 'drizzle-orm/node-postgres';
import pg from 'pg';
import * as schema from './schema';

/** Development default: the PostgreSQL that `npm start` runs (.data/pg, port 54329); the bootstrap and tests set DATABASE_URL. */
export const DEFAULT_DATABASE_URL = 'postgresql://postgres@127.0.0.1:54329/keel';

export type Db = NodePgDatabase<typeof schema>;
/** A transaction handle has the same query surface as Db for our purposes. */
export type Tx = Parameters<Parameters<Db['transaction']>[0]>[0];
export type DbOrTx = Db | Tx;

export interface PoolOptions {
  max?: number;
  /** Fail fast when PostgreSQL is unreachable so requests answer 503 instead of hanging. */
  connectionTimeoutMillis?: number;
  onError?: (err: Error) => void;
}

export function createPool(connectionString: string, opts: PoolOptions = {}): pg.Pool {
  const pool = new pg.Pool({
    connectionString,
    max: opts.max ?? 10,
    connectionTimeoutMillis: opts.connectionTimeoutMillis ?? 3000,
    idleTimeoutMillis: 30_000,
  });
  // An idle client losing its connection (server restart) emits 'error' on the pool; without a
  // listener that would crash the process. The pool drops the client and makes new ones later.
  pool.on('error', (err) => (opts.onError ?? ((e: Error) => console.warn(`[db] idle client error: ${e.message}`)))(err));
  return pool;
}

export function createDb(pool: pg.Pool): Db {
  return drizzle({ client: pool, schema });
}

export { schema };
