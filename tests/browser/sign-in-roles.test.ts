// Sign in as each demo role at phone and wide sizes, check the role's navigation, sign out.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startStack, type Stack } from '../helpers/stack';
import { openBrowser, type ViewportName } from '../helpers/browser';

const PASSWORD = 'tarrow-demo-2026';

// DESIGN.md §5.3: People and Outbox are the admin's alone; everyone sees Watch and Network.
const EXPECT: Record<string, { has: string[]; lacks: string[] }> = {
  admin: { has: ['Watch', 'Network', 'People', 'Outbox'], lacks: [] },
  engineer: { has: ['Watch', 'Network'], lacks: ['People', 'Outbox'] },
  operator: { has: ['Watch', 'Network'], lacks: ['People', 'Outbox'] },
  planner: { has: ['Watch', 'Network'], lacks: ['People', 'Outbox'] },
};

let stack: Stack;
beforeAll(async () => {
  stack = await startStack({ worker: false, mailSink: false });
});
afterAll(async () => {
  await stack?.stop();
});

for (const viewport of ['phone', 'wide'] as ViewportName[]) {
  describe(`sign-in by role at ${viewport}`, () => {
    for (const role of Object.keys(EXPECT)) {
      it(`${role} signs in, sees the role's navigation and signs out`, async () => {
        const b = await openBrowser('sign-in-roles', viewport);
        try {
          const { page } = b;
          await page.goto(`${stack.baseUrl}/`);
          await page.getByLabel('Email').fill(`${role}@tarrow.example`);
          await page.getByLabel('Password').fill(PASSWORD);
          await b.shot(`${role}-sign-in`);
          await page.getByRole('button', { name: 'Sign in' }).click();
          const nav = page.getByRole('navigation');
          await expect.poll(async () => nav.getByText('Watch', { exact: true }).count(), { timeout: 20_000 }).toBeGreaterThan(0);
          await b.shot(`${role}-watch`);
          // On a phone the sections past the fifth sit in the "More" sheet: open it to see them all.
          const more = page.getByRole('button', { name: 'More' });
          if ((await more.count()) > 0) {
            await more.click();
            await b.shot(`${role}-more`);
          }
          for (const item of EXPECT[role].has) {
            expect(await page.getByRole('link', { name: item, exact: true }).count(), `${role} should see ${item}`).toBeGreaterThan(0);
          }
          for (const item of EXPECT[role].lacks) {
            expect(await page.getByRole('link', { name: item, exact: true }).count(), `${role} should not see ${item}`).toBe(0);
          }
          if ((await more.count()) > 0) await more.click();
          await page.getByRole('button', { name: 'Sign out' }).click();
          await expect.poll(async () => page.getByRole('button', { name: 'Sign in' }).count(), { timeout: 20_000 }).toBe(1);
          expect(b.errors, b.errors.join('\n')).toEqual([]);
        } finally {
          await b.close();
        }
      });
    }
  });
}
