// An operator at a phone (390×844) and at a wide screen (1440×900): Watch shows the north–south
// mode poorly damped, with its open alert on top; the alert's page shows the damping trace with
// the 3 % and 5 % lines, the mode shape, who was told and the advisory caution; an empty note is
// refused (the API schema's words) and changes nothing; a note acknowledges the alert; the Alerts list files it under
// "Acknowledged". A planner sees the alert but no way to acknowledge it (DESIGN.md §5.3).
//
// Data: three 30-minute Tarrow recordings at rising Highmoor–Saltreach transfer (1300, 2200,
// 2950 MW) ending now, simulated, stored and scanned by the stack's worker
// (tests/helpers/scenario.ts); at 2950 MW the simulator's north–south mode is under 3 % damping,
// so the real alert rule opens an alert.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ADVISORY_CAUTION } from '../../shared/api/alerts';
import { goToSection, shotWhole, openBrowser, type BrowserSession, type ViewportName, signInAs } from '../helpers/browser';
import { DEMO_PASSWORD, ROLE_EMAIL } from '../helpers/fixtures';
import { seedAmbientScenario } from '../helpers/scenario';
import { startStack, type Stack } from '../helpers/stack';

const SUITE = 'watch-alerts';
let stack: Stack;
let alertId: number;

beforeAll(async () => {
  stack = await startStack();
  await seedAmbientScenario(stack, { levelsMw: [1300, 2200, 2950], minutes: 30, seed: 910 });
  const r = await stack.pool.query<{ id: number; state: string }>(
    `select a.id, a.state from alerts a join mode_tracks t on t.id = a.track_id where t.code = 'north-south' and a.kind = 'poor'`,
  );
  expect(r.rows, 'the seeded data should open one north–south alert').toHaveLength(1);
  alertId = r.rows[0].id;
}, 200_000);

afterAll(async () => {
  await stack?.stop();
});

for (const viewport of ['phone', 'wide'] as ViewportName[]) {
  describe(`operator at ${viewport}`, () => {
    it('sees the poorly damped mode on Watch, opens its alert and acknowledges it with a note', async () => {
      // Each size acknowledges the same alert from "open": put it back after the previous size
      // (test fixture; the rule's own evidence is unchanged).
      await stack.pool.query(`update alerts set state = 'open', acknowledged_by = null, acknowledged_at = null, note = null where id = $1`, [alertId]);
      const b = await openBrowser(SUITE, viewport);
      try {
        const { page } = b;
        await signInAs(b, stack.baseUrl, ROLE_EMAIL.operator, DEMO_PASSWORD);

        // Target of the screens' issue: Watch usable within 2 s of navigation on loopback. Measured
        // and printed (a fresh page load until the north–south card shows its band), not asserted.
        const t0 = Date.now();
        await page.goto(`${stack.baseUrl}/`);
        await page.getByTestId('watch-track-north-south').getByTestId('band-north-south-poor').first().waitFor({ timeout: 20_000 });
        console.log(`[watch] usable ${Date.now() - t0} ms after navigation at ${viewport} (target ≤ 2000 ms)`);

        // Watch: the north–south card carries the poor band as colour, shape and word.
        const card = page.getByTestId('watch-track-north-south');
        await card.waitFor({ timeout: 20_000 });
        const chip = card.getByTestId('band-north-south-poor');
        await expect.poll(() => chip.count(), { timeout: 20_000 }).toBe(1);
        expect(await chip.getAttribute('aria-label')).toMatch(/^Band: poor, \d+\.\d % ±\d+\.\d$/);
        expect(await chip.innerText()).toContain('▲');
        const cardText = await card.innerText();
        expect(cardText).toMatch(/\d+\.\d % ±\d+\.\d/); // damping with its interval
        expect(cardText).toMatch(/0\.\d{3} Hz/); // frequency, 3 decimals (the mode is near 0.3 Hz)
        expect(cardText).toMatch(/Last estimate (just now|\d+ (s|min)( \d+ s)? ago)/);
        const spark = await card.getByTestId('spark-north-south').getAttribute('aria-label');
        expect(spark).toContain('Lines at 3.0 % and 5.0 %');
        // the other natural mode is well damped at these transfers (simulator: east–west 6–8 %)
        await expect.poll(() => page.getByTestId('watch-track-east-west').getByTestId(/band-east-west-/).count()).toBe(1);
        // open alerts on top
        const alertCard = page.getByTestId(`alert-card-${alertId}`);
        await alertCard.waitFor();
        expect(await alertCard.innerText()).toMatch(/North–south[\s\S]*Open/);
        await shotWhole(b, 'watch');

        // The alert's page.
        await alertCard.click();
        await page.waitForURL(`**/alerts/${alertId}`);
        await page.getByRole('heading', { name: 'North–south: poorly damped mode' }).waitFor({ timeout: 20_000 });
        expect(await page.getByTestId('caution').innerText()).toContain(ADVISORY_CAUTION);
        const chart = page.getByTestId('alert-damping-chart');
        await chart.waitFor();
        expect(await chart.getAttribute('aria-label')).toMatch(/Threshold lines at 3\.0 % \(poor\) and 5\.0 % \(low\)/);
        // the 3 % and 5 % lines are drawn and labelled in the chart itself
        expect(await chart.locator('text').allTextContents()).toEqual(expect.arrayContaining(['3.0 % poor', '5.0 % low']));
        expect(await page.getByTestId('alert-lasted').innerText()).toMatch(/^\d+ (s|min), still running$/);
        expect(await page.getByTestId('alert-shape').getByRole('img').getAttribute('aria-label')).toMatch(/^Mode shape on a polar plot, \d+ PMU channels/);
        const told = await page.getByRole('list', { name: 'Notifications' }).innerText();
        expect(told).toContain('Demo Operator');
        expect(told).toContain('operator@tarrow.example');
        await shotWhole(b, 'alert');

        // An empty note is refused with the words of the API schema (checked before sending), and nothing changes.
        const ack = page.getByRole('button', { name: `Acknowledge alert ${alertId} on North–south` });
        await ack.click();
        await page.getByText('A note is required: say what you saw or did').waitFor({ timeout: 10_000 });
        expect((await stack.pool.query(`select state from alerts where id = $1`, [alertId])).rows[0].state).toBe('open');

        const note = `Reduced the Highmoor–Saltreach schedule by 300 MW per procedure (${viewport}).`;
        await page.getByLabel('Note').fill(note);
        await ack.click();
        await page.getByTestId('acknowledged-by').waitFor({ timeout: 10_000 });
        expect(await page.getByTestId('acknowledged-by').innerText()).toContain('Acknowledged by Demo Operator');
        await page.getByTestId('alert-state-acknowledged').first().waitFor();
        const row = (await stack.pool.query(`select a.state, a.note, p.email from alerts a join people p on p.id = a.acknowledged_by where a.id = $1`, [alertId])).rows[0];
        expect(row).toEqual({ state: 'acknowledged', note, email: ROLE_EMAIL.operator });
        await shotWhole(b, 'alert-acknowledged');

        // Alerts list: filed under "Acknowledged", none left open.
        await goToSection(b, 'Alerts');
        await page.getByRole('heading', { name: 'Alerts', level: 1 }).waitFor();
        await page.getByText('No open alerts').first().waitFor({ timeout: 10_000 });
        await shotWhole(b, 'alerts-open');
        await page.getByRole('tab', { name: /Acknowledged/ }).click();
        await page.getByTestId(`alert-card-${alertId}`).waitFor({ timeout: 10_000 });
        expect(await page.getByTestId(`alert-card-${alertId}`).innerText()).toContain(note);
        await shotWhole(b, 'alerts-acknowledged');

        expect(b.errors, b.errors.join('\n')).toEqual([]);
      } finally {
        await b.close();
      }
    }, 90_000);
  });
}

describe('planner', () => {
  it('sees the alert and its caution but has no way to acknowledge it', async () => {
    await stack.pool.query(`update alerts set state = 'open', acknowledged_by = null, acknowledged_at = null, note = null where id = $1`, [alertId]);
    const b = await openBrowser(SUITE, 'phone');
    try {
      const { page } = b;
      await signInAs(b, stack.baseUrl, ROLE_EMAIL.planner, DEMO_PASSWORD);
      await page.goto(`${stack.baseUrl}/alerts/${alertId}`);
      await page.getByRole('heading', { name: 'North–south: poorly damped mode' }).waitFor({ timeout: 20_000 });
      expect(await page.getByTestId('caution').innerText()).toContain(ADVISORY_CAUTION);
      await page.getByText('your role can view them').waitFor();
      expect(await page.getByRole('button', { name: /^Acknowledge/ }).count()).toBe(0);
      await shotWhole(b, 'alert-planner');
      expect(b.errors, b.errors.join('\n')).toEqual([]);
    } finally {
      await b.close();
    }
  }, 60_000);
});
