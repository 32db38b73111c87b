/**
 * Working standards and trace through a real browser (REQUIREMENTS TR-04, W1, W2):
 * a chemist opens the dilution page of the verified demo Pb stock, sees the expected concentration live for
 * a 10 mL pipette into a 100 mL flask (checked against the dilution core, METROLOGY §5.5), creates the
 * dilution and finds the parent in its Lineage section, then makes a five-level calibration series from the same
 * stock (proposed glassware per level, one record per level); a record that is not verified is refused on the page
 * with the reason. A chemist then makes level 3 of the series at the bench (the aliquot recorded by scanning the planned
 * pipette's identifier, a wrong code refused at the field, the make-up in the planned flask), sees its concentration ± U
 * (checked against the dilution core), signs it "prepared" through the dialog; a second chemist verifies it on the
 * verification page; its expiry (limited by the stability rule or the parent) and uncertainty show on the record, and a
 * label is printed whose text carries the recomputed concentration. QA traces that level back to the Pb lot and the
 * stock, and the lot forward to the level and its label print. QA then traces the demo Pb(NO3)2 lot and sees the stock and the new dilution made from it,
 * in the graph (nodes labelled with type and status in words) and in the list fallback, and flags them for
 * review only after giving a reason and confirming.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { D } from '../../shared/calc/decimal.ts';
import { volumetricDilution } from '../../shared/calc/dilution.ts';
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { PDFParse } from 'pdf-parse';
import { classATolerance } from '../../shared/prep/index.ts';
import { VERIFICATION_CHECKLIST } from '../../shared/schemas/preparations.ts';
import { ARTIFACTS, launchBrowser, openPage, screenshot, signIn, startServer, type RunningServer, type WatchedPage } from './harness.ts';

const PASSWORD = 'bench-demo-2026'; // the seeded demo lab's shared demo password (README)
const CHEMIST = 'chemist@harbourside.example';
const CHEMIST2 = 'chemist2@harbourside.example'; // the second analyst (README demo accounts)
const QA = 'qa@harbourside.example';
const PB_LOT = 'NRM-24-0931'; // seed/demo-data.ts, lead(II) nitrate CRM lot
const DESKTOP = { width: 1280, height: 800 };
const TABLET = { width: 820, height: 1180 };

let server: RunningServer;
let browser: Browser;
const pages: WatchedPage[] = [];
let pbStock = '';
let dilution = '';
let seriesLevels: string[] = [];
let level3 = '';

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

const text = async (page: Page, id: string) => ((await page.textContent(`[data-testid="${id}"]`)) ?? '').trim();

/** Fills the signing dialog: acknowledgement when asked (first signature), then the password. */
async function signInDialog(page: Page, password: string) {
  await page.waitForSelector('[data-testid="signature-dialog"][open]');
  if (await page.isVisible('[data-testid="signature-acknowledge"]')) {
    if (!(await page.isChecked('[data-testid="signature-acknowledge"]'))) await page.check('[data-testid="signature-acknowledge"]');
  }
  await page.fill('[data-testid="signature-password"]', password);
  await page.click('[data-testid="signature-submit"]');
}

/** The text of a PDF as pdf-parse extracts it, whitespace collapsed. */
async function pdfText(body: Buffer): Promise<string> {
  const parser = new PDFParse({ data: new Uint8Array(body) });
  try {
    return (await parser.getText()).text.replace(/\s+/g, ' ');
  } finally {
    await parser.destroy();
  }
}

/**
 * What the page reports that is expected: the 400 the test provokes on purpose (a flask code scanned as the pipette),
 * and Chromium's own PDF viewer loading chrome:// resources for the printed labels' tab.
 */
function real(problems: string[]): string[] {
  return problems.filter((p) => !/status of 400 .*\/api\/preparations\/[^/]+\/aliquots\)$/.test(p) && !/request to another host: chrome(-extension)?:\/\//.test(p));
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
    // VF-100-01 still holds the Pb stock: the picker marks it occupied and offers it disabled (one flask, one open solution)
    expect(await page.$eval('[data-testid="dilute-flask"]', (el) => [...(el as HTMLSelectElement).options].filter((o) => o.text.startsWith('VF-100-01')).map((o) => ({ disabled: o.disabled, text: o.text }))[0])).toMatchObject({ disabled: true, text: expect.stringContaining(`still holds ${pbStock}`) });
    await pick('[data-testid="dilute-flask"]', 'VF-100-02');
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
    // Each created level has a way to its bench.
    seriesLevels = await page.$$eval('[data-testid="series-created-list"] li > a:first-child', (els) => els.map((e) => (e.textContent ?? '').trim()));
    expect(seriesLevels).toHaveLength(levels.length);
    for (const id of seriesLevels) expect(await page.getAttribute(`[data-testid="series-bench-${id}"]`, 'href')).toBe(`/preparations/${id}/bench`);
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

  it('a chemist makes series level 3 at the bench, signs it prepared, a second chemist verifies it, and a label is printed', async () => {
    expect(seriesLevels.length, 'the first test created the series').toBe(5);
    level3 = seriesLevels[2]!;
    const maren = await openPage(browser, DESKTOP);
    pages.push(maren);
    const { page } = maren;
    await signIn(page, server.baseUrl, CHEMIST, PASSWORD);
    const planned = (await call(page, 'GET', `/api/preparations/${level3}`)).body;
    const dil = planned.dilution;
    expect(planned.kind).toBe('series_level');
    expect(dil.parent.identifier).toBe(pbStock);

    // From the record, the bench link opens the dilution bench: no weighing target, no weighing form.
    await page.goto(`${server.baseUrl}/preparations/${level3}`);
    await page.click('[data-testid="open-bench"]');
    await page.waitForURL(new RegExp(`/preparations/${level3}/bench$`));
    await page.waitForSelector('[data-testid="dilution-bench"]');
    expect(await page.$('[data-testid="weighing-form"]')).toBeNull();
    expect(await page.$('[data-testid="bench-target"]')).toBeNull();
    expect(await text(page, 'bench-aliquot-volume')).toBe(dil.plannedAliquot.volumeMl);
    expect(await text(page, 'bench-pipette')).toBe(dil.plannedAliquot.pipette.identifier);
    expect(await text(page, 'bench-pipette-kind')).toContain(dil.plannedAliquot.pipette.snapshot.kind.replace(/_/g, ' '));
    expect(await text(page, 'bench-parent')).toBe(pbStock);
    expect(await text(page, 'bench-parent-concentration')).toBe(dil.parent.snapshot.concentration.display);
    expect(await text(page, 'bench-flask')).toBe(planned.snapshot.flask.identifier);
    expect(await text(page, 'bench-expected')).toBe(dil.planned.display);
    expect(await text(page, 'make-up-wait')).toMatch(/Record the aliquot first/);
    // The pipette field has the focus, so a scan lands in it (not in the app's scan box).
    expect(await page.evaluate(() => document.activeElement?.getAttribute('data-testid'))).toBe('aliquot-pipette');
    const saveBox = await page.locator('[data-testid="save-aliquot"]').boundingBox();
    expect(saveBox!.height).toBeGreaterThanOrEqual(48); // gloved fingers
    await screenshot(page, 'lineage-bench-aliquot-1280');
    // On a tablet (the app bar is fixed at the top, so viewport shots rather than one full-page picture).
    await page.setViewportSize(TABLET);
    await screenshot(page, 'lineage-bench-aliquot-820', false);
    await page.locator('[data-testid="aliquot-form"]').scrollIntoViewIfNeeded();
    await screenshot(page, 'lineage-bench-aliquot-form-820', false);
    await page.setViewportSize(DESKTOP);

    // A scanned code that is not a pipette is refused by the server, at the field.
    const flaskId: string = planned.snapshot.flask.identifier;
    await page.locator('[data-testid="aliquot-pipette"]').pressSequentially(flaskId, { delay: 5 });
    await page.keyboard.press('Enter');
    if (await page.isVisible('[data-testid="aliquot-volume"]')) await page.keyboard.press('Enter'); // piston: Enter moved to the volume
    await page.waitForSelector('#pipetteIdentifier-error');
    expect(await page.textContent('#pipetteIdentifier-error')).toContain(`scan ${dil.plannedAliquot.pipette.identifier}`);
    expect(await page.getAttribute('[data-testid="aliquot-pipette"]', 'aria-invalid')).toBe('true');
    expect((await call(page, 'GET', `/api/preparations/${level3}`)).body.dilution.aliquots).toHaveLength(0);

    // The scanner types the planned pipette's identifier and Enter.
    await page.fill('[data-testid="aliquot-pipette"]', '');
    await page.locator('[data-testid="aliquot-pipette"]').pressSequentially(dil.plannedAliquot.pipette.identifier, { delay: 5 });
    await page.keyboard.press('Enter');
    if (await page.isVisible('[data-testid="aliquot-volume"]')) await page.keyboard.press('Enter');
    await page.waitForSelector('[data-testid="aliquot-current"]');
    expect(await text(page, 'aliquot-current-volume')).toBe(`${dil.plannedAliquot.volumeMl} mL`);
    expect(await text(page, 'aliquot-current-by')).toContain('Dr. Maren Tollefsen');
    expect(await text(page, 'bench-saved')).toContain('Now make up to volume');
    // A correction is a new record that supersedes the first, with a reason (append-only).
    await page.click('[data-testid="correct-aliquot"]');
    await page.waitForSelector('[data-testid="aliquot-reason"]');
    await page.fill('[data-testid="aliquot-pipette"]', dil.plannedAliquot.pipette.identifier);
    await page.click('[data-testid="save-aliquot"]'); // no reason: refused at the field, nothing sent
    await page.waitForSelector('#correctionReason-error');
    expect(await page.textContent('#correctionReason-error')).toMatch(/reason for the correction/);
    await page.fill('[data-testid="aliquot-reason"]', 'Re-pipetted: an air bubble in the first delivery');
    await page.click('[data-testid="save-aliquot"]');
    await page.waitForSelector('[data-testid="aliquot-superseded"]');
    expect(await page.locator('[data-testid="aliquot-current"]').count()).toBe(1);
    expect(await text(page, 'aliquot-current')).toContain('air bubble');
    const aliquots = (await call(page, 'GET', `/api/preparations/${level3}`)).body.dilution.aliquots;
    expect(aliquots).toHaveLength(2);
    expect(aliquots[0].supersededById).toBe(aliquots[1].id);
    await page.waitForSelector('[data-testid="correct-aliquot"]');

    // The make-up: the planned flask, a solvent from the form's choices (its lot fills in), the temperature.
    const parent = (await call(page, 'GET', `/api/preparations/${pbStock}`)).body;
    const solventName: string = parent.makeUp.solvent.name;
    await page.locator('[data-testid="make-up-form"] input[name="flaskIdentifier"]').pressSequentially(flaskId, { delay: 5 });
    const solventValue = await page.$eval(
      '[data-testid="make-up-form"] select[name="solventId"]',
      (el, name) => [...(el as HTMLSelectElement).options].find((o) => o.text.startsWith(name))?.value ?? '',
      solventName,
    );
    expect(solventValue, `${solventName} is offered`).not.toBe('');
    await page.selectOption('[data-testid="make-up-form"] select[name="solventId"]', solventValue);
    await expect.poll(() => page.inputValue('[data-testid="make-up-form"] input[name="solventLot"]')).not.toBe('');
    await page.fill('[data-testid="make-up-form"] input[name="solutionTemperatureC"]', '20.5');
    await page.click('[data-testid="save-make-up"]');
    await page.waitForSelector('[data-testid="make-up-done"]');
    await page.waitForSelector('[data-testid="bench-dilution-result"]');

    // The concentration ± U from the stored aliquot and make-up: METROLOGY §5.5 (c2 = c1·Vp/Vf, relative variances
    // add), class A tolerances as triangular a/√6 (ISO 648 / ISO 1042, QUAM A1; piston pipettes rectangular a/√3).
    const done = (await call(page, 'GET', `/api/preparations/${level3}`)).body;
    const a = done.dilution.aliquots.at(-1);
    const f = done.makeUp.flask.snapshot;
    const tol = (w: any, kind: 'pipette' | 'flask') => new D(w.toleranceMl ?? classATolerance(kind, w.nominalVolumeMl)!.toleranceMl);
    const pip = a.pipette.snapshot;
    const core = volumetricDilution({
      parent: { value: done.dilution.parent.snapshot.concentration.value, unit: done.dilution.parent.snapshot.concentration.unit, standardUncertainty: done.dilution.parent.snapshot.concentration.standardUncertainty },
      aliquot: { volumeMl: a.volumeMl, standardUncertainty: pip.kind === 'piston_pipette' ? tol(pip, 'pipette').div(new D(3).sqrt()) : tol(pip, 'pipette').div(new D(6).sqrt()) },
      final: { volumeMl: f.nominalVolumeMl, standardUncertainty: tol(f, 'flask').div(new D(6).sqrt()) },
    });
    // the concentration by the dilution core; its uncertainty adds the dilution-2 terms (repeatability, temperature)
    expect(new D(done.dilution.result.value).minus(core.value).abs().lte('1e-12')).toBe(true);
    expect(await text(page, 'bench-dilution-result')).toBe(done.dilution.result.display);
    expect(await text(page, 'bench-saved')).toContain(done.dilution.result.display);
    await screenshot(page, 'lineage-bench-done-1280');
    await page.setViewportSize(TABLET);
    await page.locator('[data-testid="bench-next-step"]').scrollIntoViewIfNeeded();
    await screenshot(page, 'lineage-bench-done-820', false);
    await page.setViewportSize(DESKTOP);

    // Next step: open the record and sign "prepared" (password re-entered in the dialog).
    await page.click('[data-testid="bench-next-step"]');
    await page.waitForURL(new RegExp(`/preparations/${level3}$`));
    await page.waitForSelector('[data-testid="sign-prepared"]:not([disabled])');
    await page.click('[data-testid="sign-prepared"]');
    await signInDialog(page, PASSWORD);
    await page.waitForSelector('[data-testid="sign-done"]');
    expect(await text(page, 'detail-status')).toContain('Prepared');
    // The one who recorded the aliquot cannot verify it.
    await page.waitForSelector('[data-testid="open-verify"][disabled]');

    // ---------------------------------------------------------------- the second chemist verifies it
    const idris = await openPage(browser, TABLET);
    pages.push(idris);
    const ip = idris.page;
    await signIn(ip, server.baseUrl, CHEMIST2, PASSWORD);
    await ip.goto(`${server.baseUrl}/preparations/${level3}`);
    await ip.waitForSelector('[data-testid="open-verify"]:not([disabled])');
    await ip.click('[data-testid="open-verify"]');
    await ip.waitForURL(new RegExp(`/preparations/${level3}/verify$`));
    await ip.waitForSelector('[data-testid="verification-panel"]');
    const boxes = ip.locator('[data-testid="verification-panel"] input[type="checkbox"]');
    expect(await boxes.count()).toBe(VERIFICATION_CHECKLIST.length);
    for (let i = 0; i < VERIFICATION_CHECKLIST.length; i += 1) await boxes.nth(i).check();
    await ip.click('[data-testid="sign-verified"]');
    await signInDialog(ip, PASSWORD);
    await ip.waitForURL(new RegExp(`/preparations/${level3}$`));
    await ip.waitForSelector('[data-testid="sign-done"]');
    expect(await text(ip, 'detail-status')).toContain('Verified');

    // The record: expiry with its reason (EX-01: capped by the stability rule or the parent), and the uncertainty.
    const verified = (await call(ip, 'GET', `/api/preparations/${level3}`)).body;
    expect(verified.status).toBe('verified');
    expect(verified.expiry.expiresOn <= parent.expiry.expiresOn, 'a level never outlives its parent').toBe(true);
    const expiry = await text(ip, 'detail-expiry');
    expect(expiry).toContain(verified.expiry.expiresOn);
    expect(expiry).toMatch(new RegExp(`limited by (the stability period|parent ${pbStock})`, 'i'));
    expect(await text(ip, 'detail-dilution-expected')).toBe(verified.dilution.planned.display);
    expect(await text(ip, 'detail-dilution-plan')).toMatch(/Relative standard uncertainty\s*\d+(\.\d+)? %/);
    await screenshot(ip, 'lineage-level-verified-820', false);

    // ---------------------------------------------------------------- a label for it
    await page.goto(`${server.baseUrl}/preparations/${level3}/print`);
    await page.waitForSelector('[data-testid="print-labels"]');
    expect(await page.$('[data-testid="unverified-warning"]')).toBeNull(); // verified: no "NOT VERIFIED" mark
    const created = page.waitForResponse((r) => r.url().endsWith(`/api/preparations/${level3}/label-prints`) && r.request().method() === 'POST');
    const popup = maren.context.waitForEvent('page');
    await page.click('[data-testid="print-labels"]');
    const res = await created;
    expect(res.status()).toBe(201);
    const print = (await res.json()) as { print: { number: number; isReprint: boolean }; pdfUrl: string };
    expect(print.print).toMatchObject({ number: 1, isReprint: false });
    await (await popup).close();
    // The printed label carries the level's identifier and its recomputed concentration, not the plan.
    const pdf = await page.request.get(`${server.baseUrl}${print.pdfUrl}`);
    expect(pdf.status()).toBe(200);
    const labelText = await pdfText(await pdf.body());
    expect(labelText).toContain(level3);
    expect(labelText).toContain(done.dilution.result.display); // the default (full) template prints the value ± U with k
    expect(labelText).not.toMatch(/planned/i);
    // The prep sheet of a dilution: the parent as used, the aliquot, c2 = c1·Vp/Vf and the result (no weighing plan).
    const sheetPdf = await (await page.request.get(`${server.baseUrl}/api/preparations/${level3}/prep-sheet.pdf`)).body();
    mkdirSync(ARTIFACTS, { recursive: true });
    writeFileSync(join(ARTIFACTS, 'lineage-level-prep-sheet.pdf'), sheetPdf); // to look at (pdftoppm)
    const sheetText = await pdfText(sheetPdf);
    expect(sheetText).toContain(done.dilution.result.display);
    expect(sheetText).toContain(`Aliquot of the parent ${pbStock}`);
    expect(sheetText).toContain('VERIFIED');
    expect(sheetText).not.toContain('undefined');

    expect(real(maren.problems)).toEqual([]);
    expect(real(idris.problems)).toEqual([]);
  }, 180_000);

  it('QA traces level 3 back to the Pb lot and the stock, and the lot forward to the level and its label', async () => {
    expect(level3, 'the bench test made level 3').not.toBe('');
    const wp = await openPage(browser, DESKTOP);
    pages.push(wp);
    const { page, problems } = wp;
    await signIn(page, server.baseUrl, QA, PASSWORD);
    await page.click('[data-testid="nav-trace"]');
    await page.waitForSelector('[data-testid="trace-search"]');
    await page.locator('[data-testid="trace-search"]').pressSequentially(level3, { delay: 5 });
    await page.keyboard.press('Enter');
    await page.waitForSelector('[data-testid="trace-subject"]');
    expect((await page.textContent('[data-testid="trace-subject"]'))?.trim()).toBe(level3);
    await page.click('[data-testid="trace-view-backward"]');
    await page.waitForSelector('[data-testid="trace-list-backward"]');
    const back = (await page.textContent('[data-testid="trace-list-backward"]')) ?? '';
    expect(back).toContain(pbStock);
    expect(back).toContain(PB_LOT);
    await screenshot(page, 'lineage-trace-level-backward-1280');

    await page.fill('[data-testid="trace-search"]', PB_LOT);
    await page.keyboard.press('Enter');
    await page.waitForFunction((lot) => document.querySelector('[data-testid="trace-subject"]')?.textContent?.trim() === lot, PB_LOT);
    expect((await page.textContent('[data-testid="trace-forward-preparations"]')) ?? '').toContain(level3);
    await page.click('[data-testid="trace-view-forward"]');
    await page.waitForSelector('[data-testid="trace-list-forward"]');
    const fwd = (await page.textContent('[data-testid="trace-list-forward"]')) ?? '';
    expect(fwd).toContain(level3);
    expect(fwd).toMatch(new RegExp(`1 label of ${level3} v\\d+`)); // the label print, as a node of the forward trace
    await screenshot(page, 'lineage-trace-lot-forward-1280');
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
