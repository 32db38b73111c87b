/**
 * End to end through a real browser: sign in, use the calculator as a chemist would, and prove that
 * the browser's numbers equal the server's. Expected values come from the shared core itself
 * (`calculatePreparation`), i.e. the test checks the page shows and rounds them faithfully; the
 * core's own correctness is covered by its unit tests against published reference values.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser } from 'playwright-core';
import { calculatePreparation, type PreparationRequest } from '../../shared/calc/preparation.ts';
import { D } from '../../shared/calc/decimal.ts';
import { launchBrowser, openPage, screenshot, signIn, startServer, type RunningServer } from './harness.ts';

const PASSWORD = 'bench-demo-2026'; // the seeded demo lab's shared demo password (README)

/** Our Pb(NO3)2 example, as the request the page should build from the form. */
const EXAMPLE: PreparationRequest = {
  target: { value: '1000', unit: 'mg/L' },
  volume: { value: '100.0', unit: 'mL', standardUncertainty: '0.05' },
  material: {
    formula: 'Pb(NO3)2',
    analyteFormula: 'Pb',
    purity: { value: '0.9995', expandedUncertainty: '0.0005', k: '2' },
    density: { value: '4.53', unit: 'g/mL' },
  },
  balance: { weightDensity: { value: '8.0', unit: 'g/mL' }, standardUncertainty: { value: '0.05', unit: 'mg' } },
  air: { temperatureC: '21.0', pressureHPa: '1009', relativeHumidityPct: '45' },
};
const READING = '159.910'; // typed with a trailing zero: the page must keep all three decimals

let server: RunningServer;
let browser: Browser;

beforeAll(async () => {
  server = await startServer();
  browser = await launchBrowser();
});

afterAll(async () => {
  await browser?.close();
  await server?.stop();
});

describe('calculate page', () => {
  it('when a chemist enters the Pb(NO3)2 example and a reading, then the page shows the core\'s numbers and the server agrees', async () => {
    const { page, problems, context } = await openPage(browser);
    try {
      await signIn(page, server.baseUrl, 'chemist@harbourside.example', PASSWORD);
      await page.click('[data-testid="nav-calculate"]');
      await page.waitForSelector('[data-testid="calc-form"]');

      // Fill every section explicitly (the page starts with the same example; typing proves the fields work).
      const fill = async (name: string, value: string) => page.fill(`[name="${name}"]`, value);
      await fill('target.value', '1000');
      await page.selectOption('[name="target.unit"]', 'mg/L');
      await fill('volume.value', '100.0');
      await page.selectOption('[name="volume.unit"]', 'mL');
      await fill('volume.standardUncertainty', '0.05');
      await fill('material.formula', 'Pb(NO3)2');
      await fill('material.analyteFormula', 'Pb');
      await fill('material.purity.value', '0.9995');
      await page.check('#material-purity-mode-expanded');
      await fill('material.purity.expandedUncertainty', '0.0005');
      await fill('material.purity.k', '2');
      await fill('material.density.value', '4.53');
      await page.selectOption('[name="material.density.unit"]', 'g/mL');
      await fill('balance.weightDensity.value', '8.0');
      await fill('balance.standardUncertainty.value', '0.05');
      await page.selectOption('[name="balance.standardUncertainty.unit"]', 'mg');
      await page.check('#air-mode-conditions');
      await fill('air.temperatureC', '21.0');
      await fill('air.pressureHPa', '1009');
      await fill('air.relativeHumidityPct', '45');
      await fill('weighing.reading.value', '');

      const planned = calculatePreparation(EXAMPLE);
      const text = (id: string) => page.textContent(`[data-testid="${id}"]`);
      await expect.poll(() => text('reading-to-aim')).toBe(new D(planned.balanceReading.value).toFixed(2));
      expect(await text('true-mass')).toBe(new D(planned.trueMass.value).toFixed(3));
      expect(planned.balanceReading.unit).toBe('mg');
      // Plausibility, independent of the core: ~159.9 mg of Pb(NO3)2 holds 100 mg of Pb.
      const aim = new D((await text('reading-to-aim')) ?? '0');
      expect(aim.gt('159.5') && aim.lt('160.3')).toBe(true);
      expect(await text('air-density')).toMatch(/^0\.001\d+$/);
      expect(await text('buoyancy-factor')).toMatch(/^1\.000\d+$/);
      await screenshot(page, 'e2e-calculate-planned', false);

      // The reading, exactly as the balance shows it.
      await fill('weighing.reading.value', READING);
      const actual = calculatePreparation({ ...EXAMPLE, weighing: { reading: { value: READING, unit: 'mg' } } }).actual!;
      await expect.poll(() => text('concentration-display')).toBe(actual.concentration.display);
      const display = (await text('concentration-display')) ?? '';
      expect(display).toContain('mg/L');
      expect(display).toContain('±');
      expect(await page.inputValue('[name="weighing.reading.value"]')).toBe(READING);
      expect(await text('reading-to-aim')).toBe(new D(planned.balanceReading.value).toFixed(3)); // follows the typed decimals
      expect(await text('actual-true-mass')).toBe(new D(actual.trueMass.value).toFixed(4));
      const budgetRows = await page.locator('[data-testid="budget-table"] tbody tr').count();
      expect(budgetRows).toBe(actual.budget.length);

      // Same request on the server.
      await page.click('[data-testid="server-check-button"]');
      await page.waitForSelector('[data-testid="server-check"]:is([data-status="match"],[data-status="mismatch"],[data-status="error"])');
      expect(await page.getAttribute('[data-testid="server-check"]', 'data-status')).toBe('match');
      await screenshot(page, 'e2e-calculate-actual');

      // A value outside the air-density equation's range is refused at the field it came from.
      await fill('air.temperatureC', '35');
      await page.waitForSelector('#air-temperatureC-error');
      expect(await page.textContent('#air-temperatureC-error')).toMatch(/35/);
      await page.waitForSelector('[data-testid="results-blocked"]');

      // Tablet size at the bench.
      await fill('air.temperatureC', '21.0');
      await page.setViewportSize({ width: 820, height: 1180 });
      await page.waitForSelector('[data-testid="aim-bar"]');
      await screenshot(page, 'e2e-calculate-tablet', false);

      expect(problems).toEqual([]);
    } finally {
      await context.close();
    }
  });
});

describe('role guard', () => {
  it('when a technician signs in, then there is no Users link and /admin/users says not allowed', async () => {
    const { page, problems, context } = await openPage(browser);
    try {
      await signIn(page, server.baseUrl, 'technician@harbourside.example', PASSWORD);
      expect(await page.textContent('[data-testid="home-role"]')).toContain('Technician');
      expect(await page.locator('[data-testid="nav-calculate"]').count()).toBeGreaterThan(0);
      expect(await page.locator('[data-testid="nav-users"]').count()).toBe(0);

      await page.goto(`${server.baseUrl}/admin/users`);
      await page.waitForSelector('[data-testid="not-allowed"]');
      expect((await page.textContent('[data-testid="not-allowed"]'))?.toLowerCase()).toContain('not allowed');
      await screenshot(page, 'e2e-technician-not-allowed', false);

      expect(problems).toEqual([]);
    } finally {
      await context.close();
    }
  });

  it('when nobody is signed in, then a protected page sends the visitor to sign-in', async () => {
    const { page, problems, context } = await openPage(browser);
    try {
      await page.goto(`${server.baseUrl}/calculate`);
      await page.waitForURL(/\/sign-in$/);
      expect(await page.locator('input[name="email"]').count()).toBe(1);
      expect(problems).toEqual([]);
    } finally {
      await context.close();
    }
  });
});
