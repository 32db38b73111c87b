/**
 * Calibrated volumes in budgets through a real browser (issue 12): the admin turns on "Use the calibrated volume of
 * checked flasks and pipettes" on the Lab settings page (big checkbox, saved, audited); a chemist then dilutes the
 * verified demo Pb stock with BP-10-01, whose demo volume check passed and was verified (seed/demo-volume-checks.ts),
 * and the record page shows the pipette's calibrated volume with the check's identifier and a budget row named
 * "Aliquot volume, calibrated (VC-…)"; the flask VF-100-02 has no check, so its row keeps the tolerance.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { launchBrowser, openPage, screenshot, signIn, startServer, type RunningServer, type WatchedPage } from './harness.ts';

const PASSWORD = 'bench-demo-2026'; // the seeded demo lab's shared demo password (README)
const ADMIN = 'admin@harbourside.example';
const CHEMIST = 'chemist@harbourside.example';

let server: RunningServer;
let browser: Browser;
const pages: WatchedPage[] = [];

beforeAll(async () => {
  server = await startServer();
  browser = await launchBrowser();
});

afterAll(async () => {
  for (const p of pages) await p.context.close().catch(() => undefined);
  await browser?.close();
  await server?.stop();
});

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

describe('calibrated volumes (browser)', () => {
  it('the admin turns the setting on; a dilution with the checked BP-10-01 shows its calibrated volume and the check on the record page', async () => {
    const admin = await openPage(browser);
    pages.push(admin);
    await signIn(admin.page, server.baseUrl, ADMIN, PASSWORD);
    await admin.page.click('[data-testid="nav-settings"]');
    await admin.page.waitForSelector('[data-testid="setting-use-calibrated-volumes"]');
    expect(await admin.page.isChecked('[data-testid="setting-use-calibrated-volumes"]')).toBe(false);
    expect(await admin.page.isDisabled('[data-testid="settings-save"]')).toBe(true); // nothing changed yet
    await admin.page.check('[data-testid="setting-use-calibrated-volumes"]');
    await admin.page.click('[data-testid="settings-save"]');
    await admin.page.waitForSelector('[data-testid="settings-saved"]');
    expect(await admin.page.textContent('[data-testid="settings-saved"]')).toContain('calibrated volumes are used for new preparations');
    await screenshot(admin.page, 'calibrated-volume-settings');
    const audit = await call(admin.page, 'GET', '/api/audit?entity=setting&pageSize=20');
    expect(JSON.stringify(audit.body)).toContain('useCalibratedVolumes');

    const chem = await openPage(browser);
    pages.push(chem);
    await signIn(chem.page, server.baseUrl, CHEMIST, PASSWORD);
    const ware = (await call(chem.page, 'GET', '/api/volumetric-ware?pageSize=100')).body.items as Array<{ id: number; identifier: string }>;
    const id = (x: string) => ware.find((w) => w.identifier === x)!.id;
    const stock = (await call(chem.page, 'GET', '/api/preparations?status=verified&pageSize=50')).body.items.find((p: { analyteFormula: string }) => p.analyteFormula === 'Pb');
    const cal = (await call(chem.page, 'GET', `/api/volumetric-ware/${id('BP-10-01')}/calibration`)).body;
    expect(cal.status).toBe('calibrated');
    const d = await call(chem.page, 'POST', `/api/preparations/${stock.identifier}/dilutions`, { method: 'volumetric', target: { value: '100', unit: 'mg/L' }, pipetteId: id('BP-10-01'), flaskId: id('VF-100-02') });
    expect(d.status, JSON.stringify(d.body)).toBe(201);
    expect((await call(chem.page, 'POST', `/api/preparations/${d.body.identifier}/aliquots`, { pipetteIdentifier: 'BP-10-01' })).status).toBe(201);
    const solvent = (await call(chem.page, 'GET', '/api/solvents')).body.items.find((x: { name: string }) => x.name === 'Ultrapure water');
    const m = await call(chem.page, 'POST', `/api/preparations/${d.body.identifier}/make-up`, { flaskIdentifier: 'VF-100-02', solventId: solvent.id, solventLot: solvent.lot, solutionTemperatureC: '20.0', applyTemperatureCorrection: false });
    expect(m.status, JSON.stringify(m.body)).toBe(201);

    await chem.page.goto(`${server.baseUrl}/preparations/${encodeURIComponent(d.body.identifier)}`);
    await chem.page.waitForSelector('[data-testid="dilution-calibrated-volume"]');
    const line = await chem.page.textContent('[data-testid="dilution-calibrated-volume"]');
    expect(line).toContain(`BP-10-01: calibrated volume`);
    expect(line).toContain(`from volume check ${cal.check.identifier}`);
    const row = await chem.page.textContent('[data-testid="budget-row-aliquot"]');
    expect(row).toContain(`Aliquot volume, calibrated (${cal.check.identifier})`);
    expect(await chem.page.textContent('[data-testid="budget-row-final"]')).toContain('Final volume');
    await screenshot(chem.page, 'calibrated-volume-dilution');
    expect(admin.problems).toEqual([]);
    expect(chem.problems).toEqual([]);
  }, 180_000);
});
