// `npm run seed`: idempotent seed of the Tarrow demo (db/seed.ts). Prints what it added.
import { createDb, createPool, DEFAULT_DATABASE_URL } from '../db/client';
import { DEMO_PASSWORD, DEMO_PEOPLE, seedAll } from '../db/seed';

async function main(): Promise<void> {
  const pool = createPool(process.env.DATABASE_URL ?? DEFAULT_DATABASE_URL, { max: 2, connectionTimeoutMillis: 10_000 });
  try {
    const added = await seedAll(createDb(pool));
    const total = Object.values(added).reduce((a, b) => a + b, 0);
    console.log(
      total === 0
        ? '[seed] nothing to add: the Tarrow demo is already in place'
        : `[seed] added ${Object.entries(added)
            .filter(([, n]) => n > 0)
            .map(([k, n]) => `${n} ${k}`)
            .join(', ')}`,
    );
    if (added.people > 0) {
      console.log(`[seed] demo accounts (password "${DEMO_PASSWORD}"): ${DEMO_PEOPLE.map((p) => p.email).join(', ')}`);
    }
  } finally {
    await pool.end();
  }
}

main().then(
  () => process.exit(0),
  (err: unknown) => {
    console.error(`[seed] failed: ${err instanceof Error ? err.message : String(err)}`);
    process.exit(1);
  },
);
