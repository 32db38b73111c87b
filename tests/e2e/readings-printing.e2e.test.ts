/**
 * Impossible readings, results outside the plan, and what counts as a print, through a real browser (issue 16
 * §2 and §3). A chemist plans a Pb stock on BAL-SM1 (82 g): a reading of 99999999999999999999.00 mg is refused at
 * the field and never sent; a reading of 400.00 mg (2.5 × the planned 160 mg) is kept with an out-of-window
 * reason; signing it as prepared asks for the reason the result stands; a second chemist's verification page
 * shows that result and reason first, and its checklist starts with it. Opening the Print page records no print
 * (the sheet there is a preview); "Print the prep sheet" records one; a second label print, with another
 * template, asks for a reason and is numbered as a reprint.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { launchBrowser, openPage, screenshot, signIn, startServer, type RunningServer } from './harness.ts';

const PASSWORD = 'bench-demo-2026'; // the seeded demo lab's shared demo password (README)

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

/** A JSON call from inside the page, so it carries that user's session cookie. */
async function call<T = any>(page: Page, method: string, path: string, body?: unknown): Promise<{ status: number; body: T }> {
  return page.evaluate(
    async ({ method, path, body }) => {
      const res = await fetch(path, {
        method,
        headers: body === undefined ? { Accept: 'application/json' } : { Accept: 'application/json', 'Content-Type': 'application/json' },
        body: body === undefined ? undefined : JSON.stringify(body),
      });
      const t = await res.text();
      return { status: res.status, body: t ? JSON.parse(t) : null };
    },
    { method, path, body },
  );
}

/** The 400 of the out-of-window weighing is provoked on purpose (the page then asks for the reason). */
const unexpected = (problems: string[]) =>
  problems.filter((p) => !/status of 400 .*\/api\/preparations\/[^/]+\/weighings\)$/.test(p) && !/request to another host: chrome(-extension)?:\/\//.test(p));

/** How many prep sheets of the record were recorded as printed (its audit trail). */
async function sheetPrints(page: Page, id: number): Promise<number> {
  const trail = await call<{ items: Array<{ action: string; changes: Array<{ field: string; newValue: unknown }> }> }>(page, 'GET', `/api/audit/records/preparation/${id}`);
  expect(trail.status).toBe(200);
  return trail.body.items.filter((e) => e.action === 'print' && e.changes.some((c) => c.field === 'kind' && c.newValue === 'prep_sheet')).length;
}

async function signDialog(page: Page) {
  if (await page.isVisible('[data-testid="signature-acknowledge"]')) {
    if (!(await page.isChecked('[data-testid="signature-acknowledge"]'))) await page.check('[data-testid="signature-acknowledge"]');
  }
  await page.fill('[data-testid="signature-password"]', PASSWORD);
}

describe('impossible readings, results outside the plan, and prints', () => {
  it('walks the refusal at the field, the out-of-plan reason to the verifier, and what the Print page records', async () => {
    const { page, problems, context } = await openPage(browser, { width: 1180, height: 820 });
    const verifier = await openPage(browser, { width: 1180, height: 820 });
    try {
      await signIn(page, server.baseUrl, 'chemist@harbourside.example', PASSWORD);
      const materials = await call(page, 'GET', '/api/materials?usable=1&pageSize=200');
      const pb = materials.body.items.find((m: any) => m.formula === 'Pb(NO3)2' && m.status === 'accepted');
      const bal = (await call(page, 'GET', '/api/balances?usable=1')).body.items.find((b: any) => b.identifier === 'BAL-SM1');
      const flask = (await call(page, 'GET', '/api/volumetric-ware?kind=volumetric_flask&usable=1')).body.items.find((w: any) => w.status === 'in_service' && Number(w.nominalVolumeMl) === 100 && !w.holds); // a flask holding no open solution
      const water = (await call(page, 'GET', '/api/solvents')).body.items.find((s: any) => s.name === 'Ultrapure water');
      expect(pb && bal && flask && water, 'demo lab has Pb(NO3)2, BAL-SM1, a 100 mL flask and ultrapure water').toBeTruthy();
      expect(bal.capacityG).toBe('82');
      const conditions = { source: 'measured', temperatureC: '21.0', pressureHPa: '1009', relativeHumidityPct: '45' };
      const planned = await call(page, 'POST', '/api/preparations', { materialId: pb.id, analyteFormula: 'Pb', target: { value: '1000', unit: 'mg/L' }, flaskId: flask.id, balanceId: bal.id, conditions });
      expect(planned.status, JSON.stringify(planned.body)).toBe(201);
      const identifier: string = planned.body.identifier;
      const id: number = planned.body.id;

      // §2: a reading beyond the balance's capacity is refused at the field; nothing goes to the server.
      const weighingPosts: string[] = [];
      page.on('request', (r) => {
        if (r.method() === 'POST' && r.url().endsWith(`/api/preparations/${identifier}/weighings`)) weighingPosts.push(r.url());
      });
      await page.goto(`${server.baseUrl}/preparations/${identifier}/bench`);
      await page.waitForSelector('[data-testid="weighing-form"]');
      await page.fill('[data-testid="input-reading"]', '99999999999999999999.00');
      await page.click('[data-testid="save-weighing"]');
      await page.waitForSelector('#reading-error');
      expect(await page.textContent('#reading-error')).toMatch(/BAL-SM1 weighs up to 82 g/);
      expect(await page.getAttribute('[data-testid="input-reading"]', 'aria-invalid')).toBe('true');
      expect(weighingPosts).toHaveLength(0);
      await screenshot(page, 'readings-impossible-refused', false);

      // A reading the balance can show, 2.5 × the plan: kept only with an out-of-window reason.
      await page.fill('[data-testid="input-reading"]', '400.00');
      await page.click('[data-testid="save-weighing"]');
      await page.waitForSelector('[data-testid="oow-panel"]');
      await page.fill('[data-testid="oow-reason"]', 'whole vial transferred for a high-level stock');
      await page.click('[data-testid="oow-confirm"]');
      await page.waitForSelector('[data-testid="weighing-entry"]');
      const madeUp = await call(page, 'POST', `/api/preparations/${identifier}/make-up`, { flaskIdentifier: flask.identifier, solventId: water.id, solventLot: water.lot, solutionTemperatureC: '20.5', applyTemperatureCorrection: false });
      expect(madeUp.status, JSON.stringify(madeUp.body)).toBe(201);
      expect(madeUp.body.resultOutOfPlan.messages[0]).toMatch(/more than twice the target 1000 mg\/L/);

      // Signing it as prepared asks for the reason the result stands.
      await page.goto(`${server.baseUrl}/preparations/${identifier}`);
      await page.click('[data-testid="sign-prepared"]');
      await page.waitForSelector('[data-testid="signature-out-of-plan"]');
      expect(await page.textContent('[data-testid="signature-out-of-plan"]')).toMatch(/more than twice the target/);
      await signDialog(page);
      await page.click('[data-testid="signature-submit"]');
      await page.waitForSelector('[data-testid="signature-out-of-plan-error"]');
      expect(await page.textContent('[data-testid="signature-out-of-plan-error"]')).toMatch(/why this result stands/i);
      await page.fill('[data-testid="signature-out-of-plan-reason"]', 'High-level spiking stock: 2500 mg/L intended');
      await signDialog(page);
      await page.click('[data-testid="signature-submit"]');
      await page.waitForSelector('[data-testid="sign-done"]');

      // The verifier sees the result and the reason first, and the checklist starts with it.
      await signIn(verifier.page, server.baseUrl, 'chemist2@harbourside.example', PASSWORD);
      await verifier.page.goto(`${server.baseUrl}/preparations/${identifier}/verify`);
      await verifier.page.waitForSelector('[data-testid="verify-out-of-plan"]');
      // … at the top of the review page, before the record, and again at the head of the checklist
      expect(await verifier.page.textContent('[data-testid="verify-out-of-plan-top-reason"]')).toContain('High-level spiking stock: 2500 mg/L intended');
      const top = await verifier.page.$eval('[data-testid="verify-out-of-plan-top"]', (e) => e.getBoundingClientRect().top);
      expect(top).toBeLessThan(await verifier.page.$eval('[data-testid="detail-identifier"]', (e) => e.getBoundingClientRect().top));
      expect(await verifier.page.textContent('[data-testid="verify-out-of-plan-reason"]')).toContain('High-level spiking stock: 2500 mg/L intended');
      const order = await verifier.page.$$eval('[data-testid="verification-panel"] [data-testid], [data-testid="verification-panel"] input[type="checkbox"]', (els) =>
        els.map((e) => e.getAttribute('data-testid') ?? ''),
      );
      expect(order[0]).toBe('verify-out-of-plan');
      const checks = order.filter((k) => k.startsWith('check-'));
      expect(checks[0]).toBe('check-result_out_of_plan');
      await screenshot(verifier.page, 'readings-verifier-sees-out-of-plan-first', false);
      expect(unexpected(verifier.problems)).toEqual([]);

      // §3: opening the Print page shows a preview of the sheet and records nothing.
      expect(await sheetPrints(page, id)).toBe(0);
      const sheetRequests: string[] = [];
      context.on('request', (r) => {
        if (r.url().includes(`/api/preparations/${identifier}/prep-sheet.pdf`)) sheetRequests.push(r.url());
      });
      const preview = page.waitForResponse((r) => r.url().includes(`/api/preparations/${identifier}/prep-sheet.pdf`));
      await page.goto(`${server.baseUrl}/preparations/${identifier}/print`);
      await page.waitForSelector('[data-testid="print-identifier"]');
      expect((await preview).status()).toBe(200);
      await page.reload();
      await page.waitForSelector('[data-testid="print-identifier"]');
      await expect.poll(() => sheetRequests.length).toBeGreaterThanOrEqual(2);
      expect(sheetRequests.every((u) => u.endsWith('?preview=1'))).toBe(true);
      expect(await sheetPrints(page, id)).toBe(0);

      // Asking to print records exactly one.
      const tab = context.waitForEvent('page');
      await page.click('[data-testid="prep-sheet-open"]');
      await (await tab).close();
      await expect.poll(() => sheetPrints(page, id)).toBe(1);

      // Labels: the first print is the original; the second, with another template, is a reprint with a reason.
      await page.waitForSelector('[data-testid="print-controls"]');
      let popup = context.waitForEvent('page');
      let created = page.waitForResponse((r) => r.url().endsWith(`/api/preparations/${identifier}/label-prints`) && r.request().method() === 'POST');
      await page.click('[data-testid="print-labels"]');
      expect(((await (await created).json()) as { print: { number: number; isReprint: boolean } }).print).toMatchObject({ number: 1, isReprint: false });
      await (await popup).close();
      await page.waitForSelector('[data-testid="reprint-fields"]');
      const options = page.locator('[data-testid="template-option"]');
      expect(await options.count()).toBeGreaterThan(1);
      await options.nth(1).click();
      await page.waitForSelector('[data-testid="reprint-fields"]'); // whatever the template
      await page.click('[data-testid="print-labels"]');
      await page.waitForSelector('#reprint-reason-error');
      expect(await page.textContent('#reprint-reason-error')).toContain('reason');
      await page.fill('[data-testid="reprint-reason"]', 'Vials moved to the autosampler rack');
      await page.check('[data-testid="reprint-destroyed"]');
      popup = context.waitForEvent('page');
      created = page.waitForResponse((r) => r.url().endsWith(`/api/preparations/${identifier}/label-prints`) && r.request().method() === 'POST');
      await page.click('[data-testid="print-labels"]');
      const second = await created;
      expect(second.status()).toBe(201);
      expect(((await second.json()) as { print: { number: number; isReprint: boolean; reason: string } }).print).toMatchObject({ number: 2, isReprint: true, reason: 'Vials moved to the autosampler rack' });
      await (await popup).close();
      await expect.poll(async () => (await page.$$eval('[data-testid="print-row"]', (els) => els.map((e) => e.getAttribute('data-reprint')))).join(',')).toBe('true,false');
      await screenshot(page, 'readings-label-reprint-numbered', false);
      expect(await sheetPrints(page, id)).toBe(1); // label prints are not prep sheet prints
      expect(unexpected(problems)).toEqual([]);
    } finally {
      await verifier.context.close();
      await context.close();
    }
  }, 240_000);
});
