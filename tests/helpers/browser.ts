// Debian's Chromium driven by playwright-core, with a fresh profile folder per launch.
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { chromium, type BrowserContext, type Page } from 'playwright-core';
import { expect } from 'vitest';

export const VIEWPORTS = {
  phone: { width: 390, height: 844 },
  wide: { width: 1440, height: 900 },
} as const;
export type ViewportName = keyof typeof VIEWPORTS;

function chromiumPath(): string {
  for (const p of ['/usr/bin/chromium', '/usr/bin/chromium-browser']) if (fs.existsSync(p)) return p;
  throw new Error('Debian chromium is not installed (apt-get install chromium)');
}

export interface BrowserSession {
  context: BrowserContext;
  page: Page;
  /** Console errors and page errors seen so far. */
  errors: string[];
  /** Saves a screenshot under test-output/screenshots/<suite>/<name>-<viewport>.png. */
  shot(name: string): Promise<string>;
  close(): Promise<void>;
}

export async function openBrowser(suite: string, viewport: ViewportName): Promise<BrowserSession> {
  const profile = fs.mkdtempSync(path.join(os.tmpdir(), 'keel-chromium-'));
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: chromiumPath(),
    headless: true,
    viewport: VIEWPORTS[viewport],
    args: [
      '--no-sandbox',
      '--disable-gpu',
      '--disable-quic',
      '--no-first-run',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
    ],
  });
  const page = context.pages()[0] ?? (await context.newPage());
  const errors: string[] = [];
  page.on('console', (msg) => {
    if (msg.type() === 'error') errors.push(msg.text());
  });
  page.on('pageerror', (err) => errors.push(String(err)));
  const outDir = path.join(process.env.KEEL_TEST_OUTPUT ?? path.resolve(__dirname, '..', '..', 'test-output'), 'screenshots', suite);
  fs.mkdirSync(outDir, { recursive: true });
  return {
    context,
    page,
    errors,
    async shot(name: string) {
      const file = path.join(outDir, `${name}-${viewport}.png`);
      await page.screenshot({ path: file, fullPage: true });
      return file;
    },
    async close() {
      await context.close();
      fs.rmSync(profile, { recursive: true, force: true });
    },
  };
}

/** Opens a section from the navigation: the tab bar or rail, or the phone's "More" sheet. */
export async function goToSection(b: BrowserSession, name: string): Promise<void> {
  const { page } = b;
  const direct = page.getByRole('navigation').getByRole('link', { name, exact: true });
  if ((await direct.count()) > 0) {
    await direct.click();
    return;
  }
  await page.getByTestId('nav-more').click();
  await page.getByTestId('nav-more-sheet').getByRole('link', { name, exact: true }).click();
}

/** The screens scroll inside the app shell: grow the viewport to the content for a whole-screen picture. */
export async function shotWhole(b: BrowserSession, name: string): Promise<void> {
  const page = b.page;
  const extra = await page.evaluate(() => {
    let most = 0;
    for (const el of Array.from(document.querySelectorAll('div'))) {
      const s = getComputedStyle(el);
      if ((s.overflowY === 'auto' || s.overflowY === 'scroll') && el.scrollHeight > el.clientHeight) most = Math.max(most, el.scrollHeight - el.clientHeight);
    }
    return most;
  });
  const size = page.viewportSize()!;
  if (extra > 0) {
    await page.setViewportSize({ width: size.width, height: Math.min(size.height + extra, 12_000) });
    await page.waitForTimeout(400);
  }
  await b.shot(name);
  if (extra > 0) await page.setViewportSize(size);
}

/**
 * Signs in from the start page; sign-in lands on Watch. `settle`: also wait for Watch's first
 * answer and the browser's late console lines, so a caller that clears `b.errors` afterwards
 * counts only its own screens.
 */
export async function signInAs(b: BrowserSession, baseUrl: string, email: string, password: string, opts: { settle?: boolean } = {}): Promise<void> {
  const { page } = b;
  await page.goto(`${baseUrl}/`);
  await page.getByLabel('Email').fill(email);
  await page.getByLabel('Password').fill(password);
  const watch = opts.settle ? page.waitForResponse((r) => new URL(r.url()).pathname === '/api/watch', { timeout: 15_000 }).catch(() => null) : null;
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.getByRole('heading', { name: 'Watch', level: 1 }).waitFor({ timeout: 20_000 });
  if (opts.settle) {
    await watch;
    // the browser logs a failed request a moment after its answer
    await page.waitForTimeout(500);
  }
}

/** No console errors so far; on failure also shows the stack's last log lines. */
export function expectNoErrors(b: BrowserSession, where: string, serverLogs: string[]): void {
  const server = b.errors.length ? `\nlast server lines:\n${serverLogs.slice(-25).join('\n')}` : '';
  expect(b.errors, `console errors on ${where}:\n${b.errors.join('\n')}${server}`).toEqual([]);
}
