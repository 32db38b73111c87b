/**
 * Working standards and trace through a real browser (REQUIREMENTS TR-04, W1, W2):
 * a chemist opens the dilution page of the verified demo Pb stock, sees the expected concentration live for
 * a 10 mL pipette into a 100 mL flask (checked against the dilution core, METROLOGY §5.5), creates the
 * dilution and finds the parent in its Lineage section, then makes a five-level calibration series from the same
 * stock (proposed glassware per level, one record per level); a record that is not verified is refused on the page
 * with the reason. QA then traces the demo Pb(NO3)2 lot and sees the stock and the new dilution made from it,
 * in the graph (nodes labelled with type and status in words) and in the list fallback, and flags them for
 * review only after giving a reason and confirming.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { D } from '../../shared/calc/decimal.ts';
import { volumetricDilution } from '../../shared/calc/dilution.ts';
import { launchBrowser, openPage, screenshot, signIn, startServer, type RunningServer, type WatchedPage } from './harness.ts';

const PASSWORD = 'bench-demo-2026'; // the seeded demo lab's shared demo password (README)
const CHEMIST = 'chemist@harbourside.example';
const QA = 'qa@harbourside.example';
const PB_LOT = 'NRM-24-0931'; // seed/demo-data.ts, lead(II) nitrate CRM lot
const DESKTOP = { width: 1280, height: 800 };

let server: RunningServer;
let browser: Browser;
const pages: WatchedPage[] = [];
let pbStock = '';
let dilution = '';

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

describe('working standards and trace', () => {
  it('a chemist opens the dilution page of the verified demo stock and makes a 1:10 dilution', async () => {
    const wp = await openPage(browser, DESKTOP);
    pages.push(wp);
    const { page, problems } = wp;
    await signIn(page, server.baseUrl, CHEMIST, PASSWORD);

    const list = await call(page, 'GET', '/api/preparations?status=verified&pageSize=50');
    expect(list.status).toBe(200);
    const pb = list.body.items.find((p: any) => p.analyteFormula === 'Pb');
    expect(pb, 'the demo lab has a verified Pb stock (seed/demo-preparations.ts)').toBeTruthy();
    pbStock = pb.identifier;
    const parent = (await call(page, 'GET', `/api/preparations/${pbStock}`)).body;
    const conc = parent.result.concentration;

    // From the record: the chemist's action opens the dilution page.
    await page.goto(`${server.baseUrl}/preparations/${pbStock}`);
    await page.waitForSelector('[data-testid="lineage-section"]');
    expect(await page.textContent('[data-testid="lineage-kind"]')).toContain('Stock solution');
    await page.click('[data-testid="open-dilute"]');
    await page.waitForSelector('[data-testid="dilute-form"]');
    expect(page.url()).toContain(`/preparations/${pbStock}/dilute`);

    // Only ware from the usable list is offered: pick the 10 mL bulb pipette and a 100 mL flask by label.
    const pick = async (sel: string, prefix: string) => {
      const value = await page.$eval(sel, (el, prefix) => [...(el as HTMLSelectElement).options].find((o) => o.text.startsWith(prefix))?.value ?? '', prefix);
      expect(value, `${prefix} is offered`).not.toBe('');
      await page.selectOption(sel, value);
    };
    const target = new D(conc.value).div(10).toSignificantDigits(3).toString();
    await page.fill('[data-testid="dilute-target"]', target);
    await pick('[data-testid="dilute-pipette"]', 'BP-10-01');
    await pick('[data-testid="dilute-flask"]', 'VF-100-01');
    const shown = ((await page.textContent('[data-testid="dilute-expected"]')) ?? '').trim();
    // METROLOGY §5.5 volumetric dilution with ISO 648 / ISO 1042 class A tolerances as triangular a/√6 (§4.4):
    // the server's dilution core gives the same rounded result the page shows.
    const core = volumetricDilution({
      parent: { value: conc.value, unit: conc.unit, standardUncertainty: conc.standardUncertainty },
      aliquot: { volumeMl: '10', standardUncertainty: new D('0.020').div(new D(6).sqrt()) },
      final: { volumeMl: '100', standardUncertainty: new D('0.10').div(new D(6).sqrt()) },
    });
    expect(shown).toBe(core.display);
    await screenshot(page, 'lineage-dilute-1280');

    await page.click('[data-testid="dilute-submit"]');
    await page.waitForURL((u) => !u.pathname.endsWith('/dilute') && /\/preparations\/[A-Z]+-\d{4}-\d{4}$/.test(u.pathname), { timeout: 15_000 });
    dilution = decodeURIComponent(page.url().split('/').pop()!);
    expect(dilution).not.toBe(pbStock);
    await page.waitForSelector('[data-testid="lineage-parent"]', { timeout: 10_000 }).catch(async (e) => {
      await screenshot(page, 'lineage-failure-new-record'); // what the browser showed instead
      throw new Error(`${String(e)}\n${problems.join('\n')}`);
    });
    expect(await page.textContent('[data-testid="lineage-kind"]')).toContain('Dilution');
    expect(await page.textContent('[data-testid="lineage-parent"]')).toContain(pbStock);
    await page.waitForSelector('[data-testid="detail-lineage-graph"] .react-flow__node');
    await page.locator('#detail-lineage-title').scrollIntoViewIfNeeded();
    await screenshot(page, 'lineage-detail-1280', false);

    // A calibration series from the same stock: five levels, the server proposes glassware, each level becomes a record.
    await page.goto(`${server.baseUrl}/preparations/${pbStock}/series`);
    await page.waitForSelector('[data-testid="series-target-4"]');
    const levels = ['2', '4', '10', '20', '40']; // mg/L; each an exact bulb-pipette/flask ratio of a ~1000 mg/L stock
    for (const [i, v] of levels.entries()) await page.fill(`[data-testid="series-target-${i}"]`, v);
    await page.click('[data-testid="series-propose"]');
    await page.waitForSelector('[data-testid="series-table"]');
    for (let i = 0; i < levels.length; i++) {
      expect(await page.inputValue(`[data-testid="series-pipette-${i}"]`), `level ${i + 1} has a proposed pipette`).not.toBe('');
      expect(await page.inputValue(`[data-testid="series-flask-${i}"]`), `level ${i + 1} has a proposed flask`).not.toBe('');
      expect(await page.textContent(`[data-testid="series-expected-${i}"]`)).toContain('± ');
    }
    await screenshot(page, 'lineage-series-proposal-1280');
    await page.click('[data-testid="series-create"]');
    await page.waitForSelector('[data-testid="series-created-list"]');
    expect(await page.locator('[data-testid="series-created-list"] li').count()).toBe(levels.length);
    await screenshot(page, 'lineage-series-created-1280', false);

    // A record that is not verified is refused on the page, with the reason (the TOC demo record awaits review).
    const prepared = await call(page, 'GET', '/api/preparations?status=prepared&pageSize=50');
    const waiting = prepared.body.items[0];
    expect(waiting, 'the demo lab has a record signed "prepared" and awaiting verification').toBeTruthy();
    await page.goto(`${server.baseUrl}/preparations/${waiting.identifier}/dilute`);
    await page.waitForSelector('[data-testid="dilute-refused"]');
    expect(await page.textContent('[data-testid="dilute-refused"]')).toContain('only a verified standard can be diluted');
    expect(await page.$('[data-testid="dilute-form"]')).toBeNull();

    expect(problems).toEqual([]);
  }, 120_000);

  it('QA traces the demo Pb(NO3)2 lot, sees what was made from it and flags it for review with a reason', async () => {
    expect(pbStock && dilution, 'the first test made the dilution').toBeTruthy();
    const wp = await openPage(browser, DESKTOP);
    pages.push(wp);
    const { page, problems } = wp;
    await signIn(page, server.baseUrl, QA, PASSWORD);
    await page.click('[data-testid="nav-trace"]');
    await page.waitForSelector('[data-testid="trace-search"]');
    // A scanner types the code and Enter.
    await page.locator('[data-testid="trace-search"]').pressSequentially(PB_LOT, { delay: 5 });
    await page.keyboard.press('Enter');
    await page.waitForSelector('[data-testid="trace-subject"]');
    expect((await page.textContent('[data-testid="trace-subject"]'))?.trim()).toBe(PB_LOT);

    const made = (await page.textContent('[data-testid="trace-forward-preparations"]')) ?? '';
    expect(made).toContain(pbStock);
    expect(made).toContain(dilution);

    await page.click('[data-testid="trace-view-forward"]');
    await page.waitForSelector('[data-testid="trace-graph-forward"] .react-flow__node');
    const nodeText = (await page.textContent('[data-testid="trace-graph-forward"]')) ?? '';
    expect(nodeText).toContain(dilution);
    expect(nodeText).toMatch(/Status: \w/); // status in words on each node, not colour alone
    const listText = (await page.textContent('[data-testid="trace-list-forward"]')) ?? '';
    expect(listText).toContain(pbStock);
    expect(listText).toContain(dilution);
    await screenshot(page, 'lineage-trace-forward-1280');

    await page.click('[data-testid="trace-view-backward"]');
    await page.waitForSelector('[data-testid="trace-list-backward"]');
    await screenshot(page, 'lineage-trace-backward-1280');

    // Flagging needs a reason, then a confirmation naming the records.
    await page.click('[data-testid="flag-start"]');
    expect(await page.textContent('#flag-reason-error')).toContain('Say why');
    expect(await page.$('[data-testid="flag-confirm"]')).toBeNull();
    await page.fill('[data-testid="flag-reason"]', 'Producer notice for lot NRM-24-0931 (demo deviation D-001)');
    await page.click('[data-testid="flag-start"]');
    await page.waitForSelector('[data-testid="flag-confirm"]');
    expect(await page.textContent('[data-testid="flag-confirm"]')).toContain(dilution);
    await screenshot(page, 'lineage-trace-flag-confirm-1280', false);
    await page.click('[data-testid="flag-confirm-yes"]');
    await page.waitForSelector('[data-testid="flag-done"]');
    const done = (await page.textContent('[data-testid="flag-done"]')) ?? '';
    expect(done).toContain(pbStock);
    expect(done).toContain(dilution);

    // The report links point at the API for a preparation subject.
    await page.fill('[data-testid="trace-search"]', dilution);
    await page.keyboard.press('Enter');
    await page.waitForSelector('[data-testid="trace-report-csv"]');
    const csvHref = await page.getAttribute('[data-testid="trace-report-csv"]', 'href');
    const csv = await page.evaluate(async (href) => (await fetch(href!)).status, csvHref);
    expect(csv).toBe(200);

    expect(problems).toEqual([]);
  }, 120_000);
});
