// An engineer uploads a simulated Tarrow recording through the document picker at phone and wide
// sizes: a refused file first (the server's message, line and reason, shown word for word), then
// 25 minutes of ambient data with one column under a name the network does not know — mapped to
// its channel in the mapping step — followed by its progress bar to the end of the ingest job.
// Then the recording's page (facts, signal, spectrum, channels), an ambient scan started from its
// form and followed to its windows and modes. Screens are checked for console errors and shot.
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { writeCsv } from '../../modal/formats/csv';
import { buildTarrowModel, simulateAmbient } from '../../modal/simulator';
import { shotWhole, openBrowser, type BrowserSession, type ViewportName, signInAs, expectNoErrors } from '../helpers/browser';
import { startStack, type Stack } from '../helpers/stack';

const PASSWORD = 'tarrow-demo-2026';
const START = Date.UTC(2025, 5, 2, 9, 0, 0) / 1000;
// Fewer channels keep the file small (≈2.5 MB): four angles and the corridor flow.
const CHANNELS = ['moorgate.angle', 'tarrow-central.angle', 'saltreach-bay.angle', 'greyscar.angle', 'moorgate.mw'];
const UNKNOWN_COLUMN = 'GRY_ANG_RAW';
const FORCED_HZ = 0.95;

let stack: Stack;
let dir: string;

beforeAll(async () => {
  // Uploads above 1 MB go to the ingest job (202), so the progress bar follows the job too.
  stack = await startStack({ env: { KEEL_INGEST_SYNC_MAX_BYTES: String(1_000_000) } });
  dir = fs.mkdtempSync(path.join(os.tmpdir(), 'keel-upload-'));
});
afterAll(async () => {
  await stack?.stop();
  if (dir) fs.rmSync(dir, { recursive: true, force: true });
});

/**
 * 25 minutes of ambient data at 2300 MW with a sustained 0.95 Hz, 15 MW injection at Cinderholt
 * (a forced oscillation between the tracks' bands); greyscar.angle written under a name the
 * network lacks.
 */
function ambientFile(seed: number): { file: string; name: string } {
  const record = simulateAmbient(buildTarrowModel(2300), {
    minutes: 25,
    seed,
    startTime: START + seed * 7200,
    channels: CHANNELS,
    forced: { frequencyHz: FORCED_HZ, amplitude: 15, site: 'cinderholt' },
  });
  const csv = writeCsv(record, { decimals: 4 }).replace(/^time,(.*)$/m, (_, cols: string) => `time,${cols.replace('greyscar.angle', UNKNOWN_COLUMN)}`);
  const name = `tarrow-ambient-2300mw-${seed}.csv`;
  const file = path.join(dir, name);
  fs.writeFileSync(file, csv);
  return { file, name };
}

/** A CSV whose fifth line goes back in time: the reader refuses it and names the line. */
function backwardsFile(): { file: string; name: string } {
  const lines = ['time,moorgate.angle', '1748854800,10.0', '1748854800.033333,10.1', '1748854800.066667,10.2', '1748854800.033333,10.3', '1748854800.1,10.4'];
  const name = 'tarrow-backwards.csv';
  const file = path.join(dir, name);
  fs.writeFileSync(file, lines.join('\n') + '\n');
  return { file, name };
}

async function pickFile(page: Page, file: string): Promise<void> {
  const chooser = page.waitForEvent('filechooser');
  await page.getByRole('button', { name: /Choose (a|another) recording file/ }).click();
  await (await chooser).setFiles(file);
}

for (const viewport of ['phone', 'wide'] as ViewportName[]) {
  describe(`recordings at ${viewport}`, () => {
    it('refuses a bad file in the server’s words, maps an unknown column, follows the upload and ingest to done, and scans the recording', async () => {
      const b = await openBrowser('recordings-upload', viewport);
      try {
        const { page } = b;
        // Server errors name their request, so a failure says which call broke.
        page.on('response', (r) => {
          if (r.status() >= 500) b.errors.push(`HTTP ${r.status()} ${r.request().method()} ${new URL(r.url()).pathname}`);
        });
        await signInAs(b, stack.baseUrl, 'engineer@tarrow.example', PASSWORD, { settle: true });
        // Errors of the sign-in screen are not this suite's; every screen from here on is.
        b.errors.length = 0;
        await page.getByRole('navigation').first().getByText('Recordings', { exact: true }).click();
        await page.getByRole('heading', { name: 'Recordings', level: 1 }).waitFor();
        if (viewport === 'phone') {
          // The first run sees the fresh database.
          await page.getByText('No recordings yet').waitFor();
          await shotWhole(b, 'recordings-empty');
        } else {
          await page.getByTestId('recordings-list').waitFor();
        }
        expectNoErrors(b, 'Recordings', stack.logs);

        // 1. A refused file: the message on screen is the server's, word for word.
        const bad = backwardsFile();
        await pickFile(page, bad.file);
        await page.getByTestId('upload-file').getByText(bad.name).waitFor();
        const refusedAnswer = page.waitForResponse((r) => r.url().endsWith('/api/recordings') && r.request().method() === 'POST');
        await page.getByRole('button', { name: `Upload ${bad.name}` }).click();
        const refused = await refusedAnswer;
        expect(refused.status()).toBe(400);
        const refusal = (await refused.json()) as { error: { code: string; message: string } };
        expect(refusal.error.code).toBe('BAD_FILE');
        expect(refusal.error.message).toMatch(/line 5/);
        const box = page.getByTestId('upload-refusal');
        await box.getByText('The file was refused').waitFor();
        expect(await box.getByText(refusal.error.message, { exact: true }).count()).toBe(1);
        await shotWhole(b, 'upload-refused');
        // A refused upload is not an app error: the browser's own line about the 400 is expected.
        b.errors.splice(0, b.errors.length, ...b.errors.filter((e) => !/status of 400/.test(e)));
        expectNoErrors(b, 'the refused upload', stack.logs);

        // 2. The ambient recording: one column the network does not know.
        const seed = viewport === 'phone' ? 31 : 32;
        const good = ambientFile(seed);
        await pickFile(page, good.file);
        await page.getByTestId('upload-file').getByText(good.name).waitFor();
        const firstAnswer = page.waitForResponse((r) => r.url().endsWith('/api/recordings') && r.request().method() === 'POST');
        await page.getByRole('button', { name: `Upload ${good.name}` }).click();
        const unmapped = await firstAnswer;
        expect(unmapped.status()).toBe(400);
        expect(((await unmapped.json()) as { error: { code: string } }).error.code).toBe('UNMAPPED_COLUMNS');
        const select = page.getByLabel(`Channel for column ${UNKNOWN_COLUMN}`);
        await select.waitFor();
        // The choices are the network's channel names and "leave out".
        const options = await select.locator('option').allTextContents();
        expect(options).toContain('greyscar.angle');
        expect(options).toContain('Leave this column out');
        // Nothing chosen yet: the step says so instead of sending.
        await page.getByRole('button', { name: 'Upload with this mapping' }).click();
        await page.getByText('Choose a channel, or leave the column out').waitFor();
        await shotWhole(b, 'upload-mapping');
        await select.selectOption('greyscar.angle');
        b.errors.splice(0, b.errors.length, ...b.errors.filter((e) => !/status of 400/.test(e)));

        const mappedAnswer = page.waitForResponse((r) => r.url().endsWith('/api/recordings') && r.request().method() === 'POST', { timeout: 60_000 });
        await page.getByRole('button', { name: 'Upload with this mapping' }).click();
        const progress = page.getByRole('progressbar', { name: `Upload of ${good.name}` });
        await progress.waitFor();
        const accepted = await mappedAnswer;
        // Over the 1 MB limit of this stack: stored by the ingest job, which the bar follows.
        expect(accepted.status()).toBe(202);
        const body = (await accepted.json()) as { recording: { id: number }; analysis: { id: number } | null };
        expect(body.analysis).not.toBeNull();
        // The bar climbs to 100 % and says the recording is ready.
        const seen: number[] = [];
        await expect
          .poll(
            async () => {
              const v = Number(await progress.getAttribute('aria-valuenow'));
              if (seen[seen.length - 1] !== v) seen.push(v);
              return v;
            },
            { timeout: 90_000, interval: 100 },
          )
          .toBe(100);
        expect(seen.every((v, i) => i === 0 || v >= seen[i - 1]), `progress went backwards: ${seen.join(', ')}`).toBe(true);
        expect(await progress.getAttribute('aria-valuetext')).toBe('100 %: Ready');
        await page.getByText(`${good.name} is ready · 5 channels · 25 min 0 s · 30 frames/s`).waitFor();
        await shotWhole(b, 'upload-done');
        expectNoErrors(b, 'the upload', stack.logs);

        // The list shows it, ready.
        await page.getByTestId(`recording-row-${body.recording.id}`).getByTestId('status-ready').waitFor({ timeout: 20_000 });

        // 3. The recording's page.
        await page.getByRole('link', { name: `Open recording ${good.name}` }).first().click();
        await page.getByRole('heading', { name: good.name, level: 1 }).waitFor();
        const facts = page.getByTestId('recording-facts');
        await facts.getByText('25 min 0 s').waitFor();
        await facts.getByText('30 frames/s').waitFor();
        expect(await facts.getByText('45,000', { exact: true }).count()).toBe(1);
        // The mapped column landed on its channel, and says where it came from.
        await page.getByTestId('channels-panel').getByText(`from column “${UNKNOWN_COLUMN}”`).waitFor();
        // Signal (min/max per bucket: 45 000 samples on a chart) and the spectrum are drawn.
        await page.getByTestId('signal-chart').locator('path').first().waitFor();
        await page.getByText(/per point, lowest and highest sample kept/).waitFor();
        await page.getByTestId('spectrum-chart').locator('path').first().waitFor({ timeout: 30_000 });
        await page.getByText(/^Welch: \d+ segments of 60 s, 0\.017 Hz resolution/).waitFor();
        // The scan form shows the estimator's defaults.
        const scanForm = page.getByTestId('scan-form');
        expect(await scanForm.getByLabel('Window (s)').inputValue()).toBe('1200');
        expect(await scanForm.getByLabel('Step (s)').inputValue()).toBe('60');
        await scanForm.getByText('default 1200 s (20 min)').waitFor();
        await shotWhole(b, 'recording');
        expectNoErrors(b, 'the recording page', stack.logs);

        // 4. An ambient scan with a longer step (fewer windows), checked by the form first.
        await scanForm.getByLabel('Step (s)').fill('-5');
        await scanForm.getByRole('button', { name: 'Start the ambient scan' }).click();
        await scanForm.getByText('stepSeconds must be positive').waitFor();
        await scanForm.getByLabel('Step (s)').fill('120');
        await scanForm.getByRole('button', { name: 'Start the ambient scan' }).click();
        await page.waitForURL(/\/scans\/\d+$/, { timeout: 20_000 });
        const scanId = Number(/\/scans\/(\d+)$/.exec(page.url())![1]);
        await page.getByRole('heading', { name: `Ambient scan ${scanId}`, level: 1 }).waitFor();
        const scanBar = page.getByRole('progressbar', { name: `Ambient scan ${scanId}` });
        await expect.poll(async () => scanBar.getAttribute('aria-valuetext'), { timeout: 120_000, interval: 250 }).toMatch(/^100 %: Done: \d+ windows$/);
        // 20-minute windows stepped by 2 minutes over 25 minutes: 3 windows.
        expect(await scanBar.getAttribute('aria-valuetext')).toBe('100 %: Done: 3 windows');
        // The stored settings are what ran: the changed step, the default window.
        await page.getByText(/20 min windows every 120 s · Yule-Walker/).first().waitFor();
        // The north–south mode has its damping chart with the 3 % and 5 % lines.
        const ns = page.getByTestId('scan-track-north-south');
        await ns.waitFor();
        await ns.getByText('3.0 % poor').first().waitFor();
        await ns.getByText('5.0 % low').first().waitFor();
        // Every window lists its modes: frequency in Hz to 3 decimals, damping in % with its interval, band in words.
        const windows = page.getByTestId('scan-windows');
        expect(await windows.getByRole('listitem').count()).toBe(3);
        const lines = await windows.locator('[data-testid^="mode-"]').allInnerTexts();
        expect(lines.length).toBeGreaterThanOrEqual(3);
        for (const l of lines) expect(l).toMatch(/\d\.\d{3} Hz/);
        const natural = lines.filter((l) => !/forced/.test(l));
        for (const l of natural) expect(l).toMatch(/\d+\.\d %( ±\d+\.\d)?/);
        for (const l of lines) expect(l).toMatch(/\b(ample|low|poor|forced)\b/);
        // The injected sinusoid is reported as forced — shape, colour and word — never as a poorly
        // damped mode (the simulator's injection frequency; the estimator's forced test).
        const forced = lines.filter((l) => /forced/.test(l));
        expect(forced.length).toBeGreaterThanOrEqual(1);
        for (const l of forced) {
          expect(l).toMatch(/0\.95\d Hz/);
          expect(l).toMatch(/∿\s*forced/);
          expect(l).not.toMatch(/poor/);
        }
        const chip = windows.getByRole('img', { name: /^Band: forced, sustained forced oscillation at 0\.95\d Hz/ }).first();
        expect(await chip.evaluate((el) => getComputedStyle(el).borderTopColor)).toBe('rgb(107, 79, 160)'); // violet #6B4FA0
        await page.getByTestId('scan-forced').getByText(/^0\.95\d Hz$/).first().waitFor();
        // North–south at 2300 MW: about 0.33 Hz and 3.6 % (the simulator's calibration, fixtures
        // README: 5 % at 1867 MW, 3 % at 2500 MW); a generous range check of what the screen shows.
        const nsLines = lines.filter((l) => /North.south/.test(l));
        expect(nsLines.length).toBe(3);
        for (const l of nsLines) {
          expect(l).toMatch(/0\.3\d\d Hz/);
          const damping = Number(/(\d+\.\d) %/.exec(l)![1]);
          expect(damping).toBeGreaterThan(1);
          expect(damping).toBeLessThan(7);
        }
        await shotWhole(b, 'scan');
        expectNoErrors(b, 'the scan', stack.logs);

        // The Recordings screen lists the scan among the latest analyses.
        await page.getByRole('navigation').first().getByText('Recordings', { exact: true }).click();
        await page.getByRole('link', { name: new RegExp(`^Open ambient scan ${scanId}`) }).waitFor();
        await shotWhole(b, 'recordings');
        expectNoErrors(b, 'Recordings', stack.logs);
      } finally {
        await b.close();
      }
    });
  });
}
