// An admin invites a new person; the invitation e-mail appears in the Outbox; its link sets a
// password; the new person signs in. At phone and wide sizes, with screenshots of every screen.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { startStack, type Stack } from '../helpers/stack';
import { openBrowser, type ViewportName } from '../helpers/browser';

const PASSWORD = 'tarrow-demo-2026';

let stack: Stack;
beforeAll(async () => {
  stack = await startStack({ worker: true, mailSink: true });
});
afterAll(async () => {
  await stack?.stop();
});

/** Follows a section link of the shell; on a phone, sections past the fifth are under "More". */
async function openSection(page: Page, name: string): Promise<void> {
  const link = page.getByRole('link', { name, exact: true });
  if ((await link.count()) === 0) await page.getByRole('button', { name: 'More' }).click();
  await link.first().click();
}

async function signIn(page: Page, email: string, password: string): Promise<void> {
  await page.getByLabel('Email', { exact: true }).fill(email);
  await page.getByLabel('Password', { exact: true }).fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await expect.poll(async () => page.getByRole('button', { name: 'Sign out' }).count(), { timeout: 20_000 }).toBeGreaterThan(0);
}

for (const viewport of ['phone', 'wide'] as ViewportName[]) {
  describe(`invitation at ${viewport}`, () => {
    it('admin invites, the e-mail is in the Outbox, its link sets a password, the new person signs in', async () => {
      const b = await openBrowser('invitation', viewport);
      const newEmail = `analyst-${viewport}@tarrow.example`;
      const newPassword = `Ridge-line ${viewport} 42`;
      try {
        const { page } = b;
        await page.goto(`${stack.baseUrl}/`);
        await signIn(page, 'admin@tarrow.example', PASSWORD);

        await openSection(page, 'People');
        await expect.poll(async () => page.getByRole('button', { name: 'Send invitation' }).count(), { timeout: 20_000 }).toBe(1);
        await b.shot('people');
        await page.getByLabel('Email', { exact: true }).fill(newEmail);
        await page.getByLabel('Role', { exact: true }).selectOption('engineer');
        await page.getByRole('button', { name: 'Send invitation' }).click();
        await expect.poll(async () => page.getByText(newEmail).count(), { timeout: 20_000 }).toBeGreaterThan(0);
        await b.shot('people-invited');

        // The worker sends the e-mail through the local SMTP sink, which files it in the Outbox.
        await openSection(page, 'Outbox');
        const message = page.getByRole('link', { name: new RegExp(`to ${newEmail.replace(/[.]/g, '\\.')}`) });
        await expect
          .poll(
            async () => {
              if ((await message.count()) > 0) return 1;
              await page.reload();
              return 0;
            },
            { timeout: 60_000, interval: 1_000 },
          )
          .toBe(1);
        await b.shot('outbox');
        await message.first().click();
        const body = page.getByTestId('outbox-message-body');
        await expect.poll(async () => body.count(), { timeout: 20_000 }).toBe(1);
        await b.shot('outbox-message');
        const href = await body.locator('a[href*="accept-invite"]').first().getAttribute('href');
        expect(href).toMatch(/\/accept-invite\?token=[A-Za-z0-9_-]{20,}/);

        await page.getByRole('button', { name: 'Sign out' }).click();
        await expect.poll(async () => page.getByRole('button', { name: 'Sign in' }).count(), { timeout: 20_000 }).toBe(1);

        await page.goto(href!);
        await expect.poll(async () => page.getByTestId('invited-email').innerText(), { timeout: 20_000 }).toContain(newEmail);
        await page.getByLabel('Display name', { exact: true }).fill(`Analyst ${viewport}`);
        await page.getByLabel('New password', { exact: true }).fill(newPassword);
        await page.getByLabel('Repeat new password', { exact: true }).fill(newPassword);
        await b.shot('accept-invite');
        await page.getByRole('button', { name: 'Accept invitation' }).click();
        await expect.poll(async () => page.getByRole('button', { name: 'Sign out' }).count(), { timeout: 20_000 }).toBeGreaterThan(0);
        await b.shot('new-person-watch');

        // The same person signs in again with the password they set.
        await page.getByRole('button', { name: 'Sign out' }).click();
        await expect.poll(async () => page.getByRole('button', { name: 'Sign in' }).count(), { timeout: 20_000 }).toBe(1);
        await signIn(page, newEmail, newPassword);
        const who = await stack.pool.query('select role, disabled from people where email = $1', [newEmail]);
        expect(who.rows).toEqual([{ role: 'engineer', disabled: false }]);
        expect(b.errors, b.errors.join('\n')).toEqual([]);
      } finally {
        await b.close();
      }
    });
  });
}
