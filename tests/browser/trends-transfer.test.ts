// A planner at a phone (390×844) and at a wide screen (1440×900). Watch warns that the data are
// stale (the newest estimate is an hour old, far past the 5-minute allowance). Trends shows the
// north–south damping with the 3 % and 5 % lines and the alert span; "Zoom in" fetches the
// narrower span from the server; the CSV link is the server's export of the period in view. The
// transfer study shows the projected transfer at 3 % damping exactly as the server computed it,
// within 15 % of the simulator's true crossing (the simulator's known eigenvalues, as in
// tests/integration/transfer-study.test.ts), with the caution; the planner saves it and the CSV
// export (the server's, GET /api/studies/transfer.csv) holds one row per window. Over a long
// period (three days of generated scan results, scripts/bench/fill-year.ts, more windows than an
// answer carries) the scatter draws a sample and says so under the chart.
//
// Data: six 30-minute Tarrow recordings at 600…3000 MW Highmoor–Saltreach transfer, half an hour
// apart, the last ending an hour ago — simulated, stored and scanned by the stack's worker
// (tests/helpers/scenario.ts).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { transferAtDampingPercent } from '../../modal/simulator';
import { goToSection, shotWhole, openBrowser, type BrowserSession, type ViewportName, signInAs } from '../helpers/browser';
import { DEMO_PASSWORD, ROLE_EMAIL } from '../helpers/fixtures';
import { fillEstimates } from '../../scripts/bench/fill-year';
import { seedAmbientScenario } from '../helpers/scenario';
import { startStack, type Stack } from '../helpers/stack';

const SUITE = 'trends-transfer';
const LEVELS_MW = [600, 1100, 1600, 2100, 2600, 3000];
let stack: Stack;

beforeAll(async () => {
  stack = await startStack();
  const end = Math.floor(Date.now() / 60_000) * 60 - 3600;
  await seedAmbientScenario(stack, { levelsMw: LEVELS_MW, minutes: 30, gapSeconds: 1800, endAt: end, seed: 930 });
}, 240_000);

afterAll(async () => {
  await stack?.stop();
});

const fromLabel = (text: string) => /From\s+(\d{4}-\d{2}-\d{2} \d{2}:\d{2} UTC)/.exec(text)?.[1];

for (const viewport of ['phone', 'wide'] as ViewportName[]) {
  describe(`planner at ${viewport}`, () => {
    it('reads the stale warning, the damping trend (zoomed) and its CSV link', async () => {
      const b = await openBrowser(SUITE, viewport);
      try {
        const { page } = b;
        await signInAs(b, stack.baseUrl, ROLE_EMAIL.planner, DEMO_PASSWORD);
        const stale = page.getByTestId('stale-warning');
        await stale.waitFor({ timeout: 20_000 });
        expect(await stale.innerText()).toMatch(/North–south: no new estimate for 1 h( \d+ min)?; one is expected at least every 5 min/);
        expect(await page.getByTestId('age-north-south').innerText()).toMatch(/^Stale · Last estimate 1 h( \d+ min)? ago/);
        await shotWhole(b, 'watch-stale');

        const first = page.waitForResponse((r) => r.url().includes('/api/tracks/north-south/estimates') && r.status() === 200);
        await goToSection(b, 'Trends');
        const body = await (await first).json();
        const chart = page.getByTestId('trend-damping-chart');
        await chart.waitFor({ timeout: 20_000 });
        expect(await chart.getAttribute('aria-label')).toMatch(/Threshold lines at 3\.0 % \(poor\) and 5\.0 % \(low\)\./);
        expect(await chart.locator('text').allTextContents()).toEqual(expect.arrayContaining(['3.0 % poor', '5.0 % low', 'alert']));
        const summary = page.getByTestId('trend-summary');
        await expect.poll(async () => /Estimates\s+(\d+)/.exec(await summary.innerText())?.[1], { timeout: 10_000 }).toBe(String(body.total));
        expect(body.total).toBeGreaterThan(LEVELS_MW.length * 10);
        const before = fromLabel(await summary.innerText());
        await shotWhole(b, 'trends');

        // Zoom in: the server is asked for the narrower span, and the summary follows it.
        const zoomed = page.waitForResponse((r) => /\/api\/tracks\/north-south\/estimates\?from=/.test(r.url()) && r.status() === 200);
        await page.getByRole('button', { name: 'Zoom in on damping' }).click();
        const zb = await (await zoomed).json();
        const span = Date.parse(zb.to) - Date.parse(zb.from);
        expect(span).toBeCloseTo((Date.parse(body.to) - Date.parse(body.from)) / 2, -3);
        // it zooms about the middle of the estimates in view, so the half span still holds some
        expect(zb.total).toBeGreaterThan(0);
        await expect.poll(async () => fromLabel(await summary.innerText()), { timeout: 10_000 }).not.toBe(before);
        await shotWhole(b, 'trends-zoomed');

        // The CSV link is the server's export of the period in view.
        const href = await page.getByRole('link', { name: /Download the North–south estimates from/ }).getAttribute('href');
        expect(href).toMatch(/^\/api\/tracks\/north-south\/estimates\.csv\?from=.+&to=.+$/);
        const csv = await page.request.get(`${stack.baseUrl}${href}`);
        expect(csv.status()).toBe(200);
        expect(csv.headers()['content-type']).toContain('text/csv');
        const lines = (await csv.text()).trim().split('\r\n');
        expect(lines[0]).toBe('time_utc,track,frequency_hz,damping_percent,damping_lo_percent,damping_hi_percent,band,forced,method,estimate_id');
        expect(lines.length - 1).toBe(zb.total);
        expect(b.errors, b.errors.join('\n')).toEqual([]);
      } finally {
        await b.close();
      }
    }, 90_000);

    it('opens the transfer study, reads the projected 3 % transfer, saves the study and exports it', async () => {
      const b = await openBrowser(SUITE, viewport);
      try {
        const { page } = b;
        await signInAs(b, stack.baseUrl, ROLE_EMAIL.planner, DEMO_PASSWORD);
        const run = page.waitForResponse((r) => r.url().includes('/api/studies/transfer?') && r.status() === 200);
        await goToSection(b, 'Transfer study');
        const { study } = await (await run).json();
        const poor = study.damping.projections.find((p: { threshold: string }) => p.threshold === 'poor');
        expect(poor.x).not.toBeNull();

        // The figure on screen is the server's projection, in whole MW with its unit.
        const shown = page.getByTestId('projection-poor-mw');
        await shown.waitFor({ timeout: 20_000 });
        const text = await shown.innerText();
        expect(text).toBe(`${Math.round(poor.x)} MW`);
        const mw = Number(/^(\d+) MW$/.exec(text)![1]);
        // Simulator truth: the transfer at which the model's north–south damping is 3 % (its
        // calibration, DESIGN.md §5.6); the estimate from ambient data is within 15 %.
        const truth = transferAtDampingPercent('north-south', 3)!;
        expect(Math.abs(mw - truth) / truth).toBeLessThan(0.15);
        const figure = await page.getByTestId('projection-poor').innerText();
        expect(figure).toContain('Damping 3.0 % (poor)');
        expect(figure).toMatch(/95 % interval \d+–\d+ MW/);
        expect(await page.getByTestId('projection-angle').innerText()).toContain('Corridor angle 45° (practical limit)');
        expect(await page.getByTestId('study-caution').innerText()).toContain('reviewed by a qualified engineer before it changes any operating limit');
        const chartText = await page.getByTestId('study-damping-chart').locator('text').allTextContents();
        expect(chartText).toEqual(expect.arrayContaining(['3.0 % poor', '5.0 % low', `3.0 % at ${Math.round(poor.x)} MW`]));
        expect(await page.getByTestId('study-angle-chart').locator('text').allTextContents()).toEqual(expect.arrayContaining(['45° practical limit']));

        // Every window is drawn (a few hundred: no sample, so no note under the chart).
        expect(study.pointsSampled).toBe(false);
        expect(study.points.length).toBe(study.pointsTotal);
        expect(await page.getByTestId('study-sample-note').count()).toBe(0);

        // Export: the server's CSV of the study's period, one row per window of the study.
        const href = await page.getByRole('link', { name: `Download the ${study.pointsTotal} windows of this study as CSV` }).getAttribute('href');
        expect(href).toMatch(/^\/api\/studies\/transfer\.csv\?track=north-south&from=.+&to=.+$/);
        const res = await page.request.get(`${stack.baseUrl}${href}`);
        expect(res.status()).toBe(200);
        expect(res.headers()['content-type']).toContain('text/csv');
        const csv = (await res.text()).trim().split('\r\n');
        expect(csv[0]).toBe('window_start_utc,window_end_utc,transfer_mw,damping_percent,damping_lo_percent,damping_hi_percent,corridor_angle_deg,forced,analysis_id');
        expect(csv.length - 1).toBe(study.points.length);
        expect(csv.slice(1).map((l) => l.split(',')[0])).toEqual(study.points.map((p: { start: string }) => p.start));
        await shotWhole(b, 'transfer');

        // Save (planners may run and save a study).
        const name = `North–south against Highmoor–Saltreach, ${viewport} check`;
        await page.getByLabel('Name').fill(name);
        await page.getByRole('button', { name: 'Save study' }).click();
        await page.getByText(`Saved as “${name}”.`).waitFor({ timeout: 20_000 });
        await page.getByRole('list', { name: 'Saved studies' }).getByText(name).waitFor({ timeout: 10_000 });
        const saved = await stack.pool.query(`select s.name, p.email from transfer_studies s join people p on p.id = s.created_by where s.name = $1`, [name]);
        expect(saved.rows).toEqual([{ name, email: ROLE_EMAIL.planner }]);
        await shotWhole(b, 'transfer-saved');
        expect(b.errors, b.errors.join('\n')).toEqual([]);
      } finally {
        await b.close();
      }
    }, 90_000);
  });
}

describe('planner at wide, over a long period', () => {
  it('draws a sample of the windows and says so under the chart; the CSV still holds every window', async () => {
    // Three days of generated scan results ending ten days ago, outside every other check's period.
    const endDay = Math.floor(Date.now() / 86_400_000) * 86_400 - 10 * 86_400;
    await fillEstimates(stack.pool, { days: 3, endDay, seed: 31, alerts: false });
    const day = (s: number) => new Date(s * 1000).toISOString().slice(0, 10);
    const b = await openBrowser(SUITE, 'wide');
    try {
      const { page } = b;
      await signInAs(b, stack.baseUrl, ROLE_EMAIL.planner, DEMO_PASSWORD);
      await goToSection(b, 'Transfer study');
      await page.getByTestId('projection-poor-mw').waitFor({ timeout: 20_000 });
      await page.getByLabel('From (UTC date)').fill(day(endDay - 3 * 86_400));
      await page.getByLabel('To (UTC date)').fill(day(endDay - 86_400));
      const run = page.waitForResponse((r) => r.url().includes(`/api/studies/transfer?`) && r.url().includes(`from=${day(endDay - 3 * 86_400)}`) && r.status() === 200);
      await page.getByRole('button', { name: 'Use these dates' }).click();
      const { study } = await (await run).json();
      expect(study.pointsTotal).toBeGreaterThan(4000);
      expect(study.points).toHaveLength(2000);
      expect(study.pointsSampled).toBe(true);

      const note = page.getByTestId('study-sample-note');
      await note.waitFor({ timeout: 20_000 });
      const total = study.pointsTotal.toLocaleString('en-US');
      expect(await note.innerText()).toMatch(new RegExp(`^Showing 2,000 of ${total} windows .*; the fitted line and the projections use all ${total}\\.$`));
      expect(await page.getByTestId('study-damping-chart').getAttribute('aria-label')).toContain(`: ${study.pointsUsed} scan windows from `);
      expect(await page.getByTestId('study-damping-chart').getAttribute('aria-label')).toContain(', 2000 of them drawn.');
      await shotWhole(b, 'transfer-sampled');

      const href = await page.getByRole('link', { name: `Download the ${study.pointsTotal} windows of this study as CSV` }).getAttribute('href');
      const res = await page.request.get(`${stack.baseUrl}${href}`);
      expect(res.status()).toBe(200);
      const lines = (await res.text()).trim().split('\r\n');
      expect(lines.length - 1).toBe(study.pointsTotal);
      expect(b.errors, b.errors.join('\n')).toEqual([]);
    } finally {
      await b.close();
    }
  }, 120_000);
});
