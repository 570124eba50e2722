// The Network screen at a phone (390×844) and at a wide screen (1440×900).
// An engineer adds a site (it is listed, stored and audited), changes the East–west mode track's
// poor/low thresholds (the list shows the new band limits), is stopped by the form when the poor
// threshold is above the low one (the shared schema's words, nothing sent), is refused by the
// server for a code another track already has (the server's message word for word, nothing
// stored), and deletes the site again. An operator sees the same lists with no way to change them
// (DESIGN.md §5.3: editing the network is for admins and engineers).
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { goToSection, openBrowser, shotWhole, type BrowserSession, type ViewportName, signInAs, expectNoErrors } from '../helpers/browser';
import { DEMO_PASSWORD, ROLE_EMAIL, rowCounts } from '../helpers/fixtures';
import { startStack, type Stack } from '../helpers/stack';

const SUITE = 'network';
let stack: Stack;

beforeAll(async () => {
  stack = await startStack({ worker: false, mailSink: false });
});

afterAll(async () => {
  await stack?.stop();
});

/** One record in the list, whether drawn as a table row (wide) or a card (phone). */
function listed(page: Page, kind: string, name: string) {
  return page.getByTestId(`network-list-${kind}`).locator('[role="row"], [role="listitem"]').filter({ hasText: name });
}

async function openKind(page: Page, kind: string, title: string): Promise<void> {
  await page.getByTestId(`network-kind-${kind}`).click();
  await page.waitForURL(`**/network/${kind}`);
  await page.getByRole('table', { name: title }).or(page.getByRole('list', { name: title })).waitFor({ timeout: 20_000 });
}

const trackRow = async (code: string) =>
  (await stack.pool.query(`select id, code, name, poor_below, low_below, min_hz, max_hz, reference from mode_tracks where code = $1`, [code])).rows[0];
const auditCount = async () => (await stack.pool.query<{ n: number }>(`select count(*)::int as n from audit_log`)).rows[0].n;

for (const viewport of ['phone', 'wide'] as ViewportName[]) {
  describe(`engineer at ${viewport}`, () => {
    it('adds a site, changes a mode track’s thresholds, sees a bad edit refused with nothing stored, deletes the site', async () => {
      // Each size edits the same track from the seeded 3 % / 5 % (test fixture, as seeded).
      await stack.pool.query(`update mode_tracks set poor_below = 3, low_below = 5 where code = 'east-west'`);
      const siteCode = `fernhollow-${viewport}`;
      const siteName = `Fernhollow (${viewport})`;
      const b = await openBrowser(SUITE, viewport);
      try {
        const { page } = b;
        page.on('response', (r) => {
          if (r.status() >= 500) b.errors.push(`HTTP ${r.status()} ${r.request().method()} ${new URL(r.url()).pathname}`);
        });
        await signInAs(b, stack.baseUrl, ROLE_EMAIL.engineer, DEMO_PASSWORD);
        b.errors.length = 0;

        await goToSection(b, 'Network');
        await page.getByRole('heading', { name: 'Network', level: 1 }).waitFor({ timeout: 20_000 });
        await page.getByText('You can change them.').waitFor();

        // 1. A new site in Eastfell.
        await openKind(page, 'sites', 'Sites');
        expect(await listed(page, 'sites', 'Moorgate').count()).toBe(1);
        await page.getByTestId('network-new').click();
        await page.waitForURL('**/network/sites/new');
        const newForm = page.getByRole('region', { name: 'New site' });
        await newForm.waitFor();
        await newForm.getByLabel('Name', { exact: true }).fill(siteName);
        await newForm.getByLabel('Code', { exact: true }).fill(siteCode);
        await newForm.getByLabel('Area', { exact: true }).selectOption({ label: 'Eastfell' });
        await newForm.getByLabel('Voltage (kV)', { exact: true }).fill('345');
        await newForm.getByLabel('Schematic x', { exact: true }).fill('82');
        await newForm.getByLabel('Schematic y', { exact: true }).fill('47');
        await newForm.getByRole('button', { name: 'Create site' }).click();
        await page.waitForURL('**/network/sites');
        await page.getByText(`Site “${siteName}” created.`).waitFor({ timeout: 10_000 });
        const siteItem = listed(page, 'sites', siteName);
        await siteItem.waitFor();
        const siteText = await siteItem.innerText();
        expect(siteText).toContain(siteCode);
        expect(siteText).toContain('Eastfell');
        expect(siteText).toContain('345 kV');
        expect(siteText).toMatch(/82,\s*47/);
        const stored = await stack.pool.query(
          `select s.name, s.kv, s.x, s.y, a.code as area from sites s join areas a on a.id = s.area_id where s.code = $1`,
          [siteCode],
        );
        expect(stored.rows).toEqual([{ name: siteName, kv: 345, x: 82, y: 47, area: 'eastfell' }]);
        await shotWhole(b, 'site-added');
        expectNoErrors(b, 'adding a site', stack.logs);

        // 2. East–west: poor below 2.5 %, low below 6 %.
        await openKind(page, 'tracks', 'Mode tracks');
        const before = await trackRow('east-west');
        await page.getByRole('button', { name: 'Edit mode track East–west' }).click();
        await page.waitForURL(`**/network/tracks/${before.id}`);
        let trackForm = page.getByRole('region', { name: 'Edit mode track “East–west”' });
        await trackForm.waitFor();
        expect(await trackForm.getByLabel('Poor below (%)', { exact: true }).inputValue()).toBe('3');
        expect(await trackForm.getByLabel('Low below (%)', { exact: true }).inputValue()).toBe('5');
        await trackForm.getByLabel('Poor below (%)', { exact: true }).fill('2.5');
        await trackForm.getByLabel('Low below (%)', { exact: true }).fill('6');
        await trackForm.getByRole('button', { name: 'Save changes' }).click();
        await page.waitForURL('**/network/tracks');
        await page.getByText('Mode track “East–west” saved.').waitFor({ timeout: 10_000 });
        const trackItem = listed(page, 'tracks', 'East–west');
        await expect.poll(async () => trackItem.innerText(), { timeout: 10_000 }).toMatch(/poor < 2\.5 %[\s\S]*low < 6\.0 %/);
        const edited = await trackRow('east-west');
        expect({ poor: edited.poor_below, low: edited.low_below }).toEqual({ poor: 2.5, low: 6 });
        const audit = await stack.pool.query(`select action, details from audit_log where target = 'track:east-west' order by id desc limit 1`);
        expect(audit.rows[0]).toEqual({
          action: 'network.update',
          details: { changed: { poorBelow: { from: 3, to: 2.5 }, lowBelow: { from: 5, to: 6 } } },
        });
        expectNoErrors(b, 'changing the thresholds', stack.logs);

        // 3a. Poor above low: the form stops it with the shared schema's words and sends nothing.
        const patches: string[] = [];
        page.on('request', (r) => {
          if (r.method() === 'PATCH' && new URL(r.url()).pathname.startsWith('/api/network/tracks/')) patches.push(r.url());
        });
        const countsBefore = await rowCounts(stack.pool);
        const auditBefore = await auditCount();
        await page.getByRole('button', { name: 'Edit mode track East–west' }).click();
        trackForm = page.getByRole('region', { name: 'Edit mode track “East–west”' });
        await trackForm.waitFor();
        await trackForm.getByLabel('Poor below (%)', { exact: true }).fill('7');
        await trackForm.getByRole('button', { name: 'Save changes' }).click();
        await trackForm.getByText('Must be above the poor threshold (poorBelow)', { exact: true }).waitFor({ timeout: 10_000 });
        expect(await trackForm.getByLabel('Low below (%)', { exact: true }).getAttribute('aria-invalid')).toBe('true');
        expect(patches).toEqual([]);

        // 3b. A code another track has: the server refuses, and the form shows its message as sent.
        await trackForm.getByLabel('Poor below (%)', { exact: true }).fill('2.5');
        await trackForm.getByLabel('Code', { exact: true }).fill('north-south');
        const answer = page.waitForResponse((r) => r.request().method() === 'PATCH' && new URL(r.url()).pathname === `/api/network/tracks/${before.id}`);
        await trackForm.getByRole('button', { name: 'Save changes' }).click();
        const refused = await answer;
        expect(refused.status()).toBe(409);
        const refusal = (await refused.json()) as { error: { code: string; message: string; details: { path: string; message: string }[] } };
        expect(refusal.error).toEqual({
          code: 'CONFLICT',
          message: 'A mode track with code "north-south" already exists',
          details: [{ path: 'code', message: 'Already in use' }],
        });
        const formAlert = trackForm.getByRole('alert').filter({ hasText: refusal.error.message });
        await formAlert.first().waitFor({ timeout: 10_000 });
        expect(await trackForm.getByText(refusal.error.message, { exact: true }).count()).toBe(1);
        await trackForm.getByText('Already in use', { exact: true }).waitFor();
        expect(await trackForm.getByLabel('Code', { exact: true }).getAttribute('aria-invalid')).toBe('true');
        // Still on the form with what was typed, and nothing stored or audited.
        expect(page.url()).toMatch(new RegExp(`/network/tracks/${before.id}$`));
        expect(await trackForm.getByLabel('Code', { exact: true }).inputValue()).toBe('north-south');
        expect(await trackRow('east-west')).toEqual(edited);
        expect(await rowCounts(stack.pool)).toEqual(countsBefore);
        expect(await auditCount()).toBe(auditBefore);
        await shotWhole(b, 'track-refused');
        // A refused edit is not an app error: the browser's own line about the 409 is expected.
        b.errors.splice(0, b.errors.length, ...b.errors.filter((e) => !/status of 409/.test(e)));
        expectNoErrors(b, 'the refused edit', stack.logs);
        await trackForm.getByRole('button', { name: 'Cancel' }).click();
        await page.waitForURL('**/network/tracks');
        expect(await listed(page, 'tracks', 'East–west').count()).toBe(1);

        // 4. The site goes again, after a confirmation on the form.
        await openKind(page, 'sites', 'Sites');
        await page.getByRole('button', { name: `Edit site ${siteName}` }).click();
        const siteForm = page.getByRole('region', { name: `Edit site “${siteName}”` });
        await siteForm.waitFor();
        await siteForm.getByRole('button', { name: 'Delete site' }).click();
        await siteForm.getByRole('button', { name: `Yes, delete site ${siteName}` }).click();
        await page.waitForURL('**/network/sites');
        await page.getByText(`Site “${siteName}” deleted.`).waitFor({ timeout: 10_000 });
        expect(await listed(page, 'sites', siteName).count()).toBe(0);
        expect((await stack.pool.query(`select id from sites where code = $1`, [siteCode])).rows).toEqual([]);
        const siteAudit = await stack.pool.query(`select action from audit_log where target = $1 order by id`, [`site:${siteCode}`]);
        expect(siteAudit.rows.map((r) => r.action)).toEqual(['network.create', 'network.delete']);
        await shotWhole(b, 'site-deleted');
        expectNoErrors(b, 'deleting the site', stack.logs);
      } finally {
        await b.close();
      }
    }, 120_000);
  });

  describe(`operator at ${viewport}`, () => {
    it('reads the network with no way to change it', async () => {
      const b = await openBrowser(SUITE, viewport);
      try {
        const { page } = b;
        await signInAs(b, stack.baseUrl, ROLE_EMAIL.operator, DEMO_PASSWORD);
        b.errors.length = 0;
        await goToSection(b, 'Network');
        await page.getByRole('heading', { name: 'Network', level: 1 }).waitFor({ timeout: 20_000 });
        await page.getByText('Areas, sites, PMUs, channels, corridors and mode tracks (read only).').waitFor();

        for (const [kind, title, name] of [
          ['areas', 'Areas', 'Highmoor'],
          ['sites', 'Sites', 'Moorgate'],
          ['tracks', 'Mode tracks', 'North–south'],
        ] as const) {
          await openKind(page, kind, title);
          expect(await listed(page, kind, name).count(), `${name} is listed under ${title}`).toBe(1);
          expect(await page.getByTestId('network-new').count()).toBe(0);
          expect(await page.getByRole('button', { name: /^Edit / }).count()).toBe(0);
        }
        await shotWhole(b, 'operator-tracks');

        // Even at a form's own address there is no form, only the reason.
        const ns = await trackRow('north-south');
        await page.goto(`${stack.baseUrl}/network/tracks/${ns.id}`);
        await page.getByText('Only administrators and engineers change the network.').waitFor({ timeout: 20_000 });
        expect(await page.getByTestId('network-form').count()).toBe(0);
        expect(await page.getByRole('textbox').count()).toBe(0);
        expect(await page.getByRole('button', { name: /Save|Delete|Create/ }).count()).toBe(0);
        await page.goto(`${stack.baseUrl}/network/sites/new`);
        await page.getByText('Only administrators and engineers change the network.').waitFor({ timeout: 20_000 });
        expect(await page.getByTestId('network-form').count()).toBe(0);
        expectNoErrors(b, 'the read-only screen', stack.logs);
      } finally {
        await b.close();
      }
    }, 90_000);
  });
}
