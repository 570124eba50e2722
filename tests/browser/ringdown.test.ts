// The ring-down view at phone and wide sizes: an engineer uploads a simulated line trip (40 s after
// the event) through the document picker, fits the 20 s after the event from the recording's
// page, switches a mode off in the ring-down view and sees the reconstruction (its SVG path) and
// the residual change, reads both methods' modes side by side, then brushes a new interval on the
// raw signal and fits again: a new fit opens with that interval. No console errors; every screen shot.
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { Locator, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { writeCsv } from '../../modal/formats/csv';
import { buildTarrowModel, simulateRingdown, type RingdownSimulation } from '../../modal/simulator';
import { FIT_CSV_COLUMNS } from '../../shared/api/fits';
import { LIGHT_CHANNELS } from '../../scripts/seed-demo';
import { shotWhole, openBrowser, type BrowserSession, type ViewportName, signInAs, expectNoErrors } from '../helpers/browser';
import { startStack, type Stack } from '../helpers/stack';

const PASSWORD = 'tarrow-demo-2026';
// Angles and flows of every PMU (the channels the tracks and corridors use), as the fit API test.
const CHANNELS = LIGHT_CHANNELS;
const RECON_COLOR = '#0F6E6A';

let stack: Stack;
let dir: string;

beforeAll(async () => {
  stack = await startStack();
  dir = fs.mkdtempSync(path.join(os.tmpdir(), 'keel-ringdown-'));
});
afterAll(async () => {
  await stack?.stop();
  if (dir) fs.rmSync(dir, { recursive: true, force: true });
});

/**
 * A line trip at 2000 MW: 5 s of ambient data, then 40 s after the trip. No load noise after the
 * event (PMU noise only), so both methods find the inter-area modes (as in the fit API test).
 */
function ringdownFile(seed: number): { file: string; name: string; sim: RingdownSimulation } {
  const start = Date.UTC(2025, 6, 3, 14, 0, 0) / 1000 + seed * 600;
  const sim = simulateRingdown(buildTarrowModel(2000), { event: 'line-trip', seed, startTime: start, seconds: 40, preEventSeconds: 5, loadNoise: 0, channels: CHANNELS });
  const name = `tarrow-line-trip-2000mw-${seed}.csv`;
  const file = path.join(dir, name);
  fs.writeFileSync(file, writeCsv(sim.record, { decimals: 5 }));
  return { file, name, sim };
}

/** The `d` of the reconstruction's line (drawn in the accent colour) in the ring-down chart. */
async function reconstructionPath(page: Page): Promise<string> {
  const d = await page.getByTestId('ringdown-fit-chart').locator(`path[stroke="${RECON_COLOR}" i]`).first().getAttribute('d');
  expect(d, 'the reconstruction path').toBeTruthy();
  return d!;
}

async function waitForFitDone(page: Page, id: number): Promise<void> {
  await page.getByRole('heading', { name: `Ring-down fit ${id}`, level: 1 }).waitFor();
  await page.getByTestId('ringdown-view').waitFor({ timeout: 90_000 });
}

/** Drags across a chart from one fraction of its width to another (a mouse drag: pointer events). */
async function brush(page: Page, chart: Locator, fromFrac: number, toFrac: number): Promise<void> {
  await chart.scrollIntoViewIfNeeded();
  const box = (await chart.boundingBox())!;
  const y = box.y + box.height * 0.45;
  await page.mouse.move(box.x + box.width * fromFrac, y);
  await page.mouse.down();
  await page.mouse.move(box.x + box.width * ((fromFrac + toFrac) / 2), y, { steps: 6 });
  await page.mouse.move(box.x + box.width * toFrac, y, { steps: 6 });
  await page.mouse.up();
}

for (const viewport of ['phone', 'wide'] as ViewportName[]) {
  describe(`ring-down view at ${viewport}`, () => {
    it('uploads a ring-down, fits it, switches a mode off, compares the methods, brushes a new interval and fits again', async () => {
      const b = await openBrowser('ringdown', viewport);
      try {
        const { page } = b;
        // Server errors name their request, so a failure says which call broke.
        page.on('response', (r) => {
          if (r.status() >= 500) b.errors.push(`HTTP ${r.status()} ${r.request().method()} ${new URL(r.url()).pathname}`);
        });
        await signInAs(b, stack.baseUrl, 'engineer@tarrow.example', PASSWORD, { settle: true });
        b.errors.length = 0;
        await page.getByRole('navigation').first().getByText('Recordings', { exact: true }).click();
        await page.getByRole('heading', { name: 'Recordings', level: 1 }).waitFor();

        // Upload through the document picker; a small file is stored within the request.
        const { file, name, sim } = ringdownFile(viewport === 'phone' ? 41 : 42);
        const chooser = page.waitForEvent('filechooser');
        await page.getByRole('button', { name: 'Choose a recording file' }).click();
        await (await chooser).setFiles(file);
        await page.getByRole('button', { name: `Upload ${name}` }).click();
        const bar = page.getByRole('progressbar', { name: `Upload of ${name}` });
        await expect.poll(async () => bar.getAttribute('aria-valuetext'), { timeout: 60_000 }).toBe('100 %: Ready');
        await page.getByTestId('upload-summary').getByText(`${name} is ready · ${CHANNELS.length} channels · 45.0 s · 30 frames/s`).waitFor();
        await shotWhole(b, 'upload-done');
        expectNoErrors(b, 'the upload', stack.logs);

        // The recording's page: type the 20 s after the event into the fit form.
        await page.getByRole('link', { name: `Open recording ${name}` }).first().click();
        await page.getByRole('heading', { name, level: 1 }).waitFor();
        await page.getByTestId('signal-chart').locator('path').first().waitFor();
        const form = page.getByTestId('fit-form');
        // The interval is suggested from the largest step (the trip, 5 s in): a starting point.
        await form.getByText(/^Suggested: the 20\.0 s after the largest step/).waitFor();
        const eventOffset = sim.eventTime - sim.record.startTime; // 5 s
        await form.getByLabel('From (s)').fill(String(eventOffset + 0.1));
        await form.getByLabel('To (s)').fill(String(eventOffset + 20.1));
        // Units everywhere: the interval's UTC ends beside the fields.
        await form.getByText('20.0 s long', { exact: false }).waitFor();
        await shotWhole(b, 'recording');
        expectNoErrors(b, 'the recording page', stack.logs);
        await form.getByRole('button', { name: 'Fit this interval' }).click();
        await page.waitForURL(/\/fits\/\d+$/, { timeout: 20_000 });
        const fitId = Number(/\/fits\/(\d+)$/.exec(page.url())![1]);
        await waitForFitDone(page, fitId);
        await page.getByText(/20\.0 s from \d{4}-\d\d-\d\d \d\d:\d\d:\d\d\.\d UTC/).first().waitFor();

        // Both methods, side by side; every number with its unit.
        const table = page.getByTestId('modes-table');
        await table.waitFor();
        const tableText = await table.innerText();
        expect(tableText).toMatch(/Prony/);
        expect(tableText).toMatch(/Matrix pencil/);
        expect(tableText).toMatch(/SNR \d+\.\d dB/);
        expect(tableText).toMatch(/0\.2\d\d Hz/); // north–south after the trip ≈ 0.282 Hz (simulator truth)
        expect(tableText).toMatch(/\d+\.\d %/);
        expect(tableText).toMatch(/−?\d+°/);
        expect(tableText).toMatch(/\d+ %|<1 %/);
        expect(tableText).toMatch(/= agree|≠ differ|only /);
        await page.getByText(/combined tolerance √\(u₁² \+ u₂²\)/).first().waitFor();

        // Switch the strongest mode off: the reconstruction drawn is the sum of the others.
        const switches = page.getByTestId('mode-switches').getByRole('switch');
        const count = await switches.count();
        expect(count).toBeGreaterThanOrEqual(2); // north–south and east–west at least, noise-free event
        await page.getByRole('switch').first().scrollIntoViewIfNeeded();
        const before = await reconstructionPath(page);
        const residualBefore = await page.getByTestId('ringdown-residual-summary').innerText();
        const first = switches.first();
        expect(await first.getAttribute('aria-checked')).toBe('true');
        await first.click();
        expect(await first.getAttribute('aria-checked')).toBe('false');
        await expect.poll(() => reconstructionPath(page)).not.toBe(before);
        const after = await reconstructionPath(page);
        expect(after).not.toBe(before);
        // The mode's part moves into the residual.
        expect(await page.getByTestId('ringdown-residual-summary').innerText()).not.toBe(residualBefore);
        await page.getByText(new RegExp(`reconstruction, ${count - 1} of ${count} modes`)).first().waitFor();
        await shotWhole(b, 'ringdown-mode-off');
        // And back on: the fit's own reconstruction again.
        await first.click();
        await expect.poll(() => reconstructionPath(page)).toBe(before);
        await page.getByTestId('mode-shape-polar').waitFor();
        await shotWhole(b, 'ringdown');
        expectNoErrors(b, 'the ring-down view', stack.logs);

        // The CSV export is a link to the server.
        const csvHref = await page.getByRole('link', { name: `Download fit ${fitId} as CSV` }).getAttribute('href');
        expect(csvHref).toBe(`/api/fits/${fitId}.csv`);
        const csv = await page.request.get(`${stack.baseUrl}${csvHref}`);
        expect(csv.status()).toBe(200);
        expect(csv.headers()['content-type']).toMatch(/^text\/csv/);
        expect((await csv.text()).split('\r\n')[0]).toBe(FIT_CSV_COLUMNS.join(','));

        // Brush a new interval on the raw signal: the fields follow, then fit again.
        const refit = page.getByTestId('refit-form');
        const fromField = refit.getByLabel('From (s)');
        const toField = refit.getByLabel('To (s)');
        expect(Number(await fromField.inputValue())).toBeCloseTo(eventOffset + 0.1, 1);
        const raw = page.getByTestId('signal-chart');
        await brush(page, raw, 0.35, 0.8);
        await expect.poll(async () => Number(await fromField.inputValue()), { timeout: 10_000 }).not.toBeCloseTo(eventOffset + 0.1, 1);
        const newFrom = Number(await fromField.inputValue());
        const newTo = Number(await toField.inputValue());
        expect(newTo - newFrom).toBeGreaterThan(2);
        expect(newFrom).toBeGreaterThan(eventOffset + 0.1);
        // The selection is on the sample grid (30 frames/s) and inside the recording.
        expect(Math.abs(newFrom * 30 - Math.round(newFrom * 30))).toBeLessThan(0.31);
        expect(newTo).toBeLessThanOrEqual(45);
        await shotWhole(b, 'ringdown-brushed');
        await refit.getByRole('button', { name: 'Fit again' }).click();
        await page.waitForURL((u) => /\/fits\/\d+$/.test(u.pathname) && u.pathname !== `/fits/${fitId}`, { timeout: 20_000 });
        const refitId = Number(/\/fits\/(\d+)$/.exec(page.url())![1]);
        expect(refitId).toBeGreaterThan(fitId);
        await waitForFitDone(page, refitId);
        // The new fit covers the brushed interval.
        const span = (newTo - newFrom).toFixed(1);
        await page.getByText(new RegExp(`${span.replace('.', '\\.')} s from `)).first().waitFor();
        await page.getByTestId('modes-table').waitFor();
        await shotWhole(b, 'refit');
        expectNoErrors(b, 'the new fit', stack.logs);

        // Both fits are listed on the recording's page.
        await page.getByRole('link', { name: 'Back to the recording' }).click();
        await page.getByRole('link', { name: `Open ring-down fit ${fitId}` }).waitFor();
        await page.getByRole('link', { name: `Open ring-down fit ${refitId}` }).waitFor();
        expectNoErrors(b, 'the recording page', stack.logs);
      } finally {
        await b.close();
      }
    });
  });
}
