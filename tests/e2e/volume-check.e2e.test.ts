/**
 * Glassware check through a real browser (issue 12 §1): on a tablet-sized screen the technician opens the demo
 * 10 mL bulb pipette's inventory page, plans a check from it (a balance past its calibration is refused with the
 * gate shown, a water temperature outside Tanaka's range is refused at the field by the API), enters 10 readings
 * at the bench as the balance shows them (one corrected with a reason, the old reading kept), seeing each
 * replicate's volume at 20 °C and the running mean from the stateless endpoint; the result shows the verdict with
 * its limit and source. A chemist signs it prepared, a second chemist verifies it after the checklist; the ware page
 * then shows the pipette calibrated with the check's next due date, and the calibration certificate downloads as a
 * PDF carrying the check's identifier.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { PDFParse } from 'pdf-parse';
import { launchBrowser, openPage, signIn, startServer, type RunningServer, type WatchedPage } from './harness.ts';

const PASSWORD = 'bench-demo-2026'; // the seeded demo lab's shared demo password (README)
const TECHNICIAN = 'technician@harbourside.example';
const CHEMIST = 'chemist@harbourside.example';
const CHEMIST2 = 'chemist2@harbourside.example';
const PIPETTE = 'BP-10-01'; // seed/demo-data.ts: ISO 648 class A 10 mL bulb pipette
const TABLET = { width: 820, height: 1180 };
// Net readings of 10 mL of water at about 20.5 °C (invented, plausible for a class A pipette on a 0.1 mg balance).
const READINGS = ['9.9743', '9.9750', '9.9739', '9.9758', '9.9746', '9.9748', '9.9737', '9.9754', '9.9745', '9.9741'];

let server: RunningServer;
let browser: Browser;
const pages: WatchedPage[] = [];
let wareId = 0;
let check = '';

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

async function signInDialog(page: Page) {
  await page.waitForSelector('[data-testid="signature-dialog"][open]');
  if (await page.isVisible('[data-testid="signature-acknowledge"]')) {
    if (!(await page.isChecked('[data-testid="signature-acknowledge"]'))) await page.check('[data-testid="signature-acknowledge"]');
  }
  await page.fill('[data-testid="signature-password"]', PASSWORD);
  await page.click('[data-testid="signature-submit"]');
}

async function pdfText(body: Buffer): Promise<string> {
  const parser = new PDFParse({ data: new Uint8Array(body) });
  try {
    return (await parser.getText()).text.replace(/\s+/g, ' ');
  } finally {
    await parser.destroy();
  }
}

/** The 400s this test provokes on purpose (refused plans) are expected in the console. */
function real(problems: string[]): string[] {
  return problems.filter((p) => !/status of 400 .*\/api\/volume-checks\)$/.test(p));
}

async function pickOption(page: Page, sel: string, prefix: string) {
  const value = await page.$eval(sel, (el, prefix) => [...(el as HTMLSelectElement).options].find((o) => o.text.startsWith(prefix))?.value ?? '', prefix);
  expect(value, `${prefix} is offered`).not.toBe('');
  await page.selectOption(sel, value);
}

describe('gravimetric check of a bulb pipette', () => {
  it('the technician plans a check from the pipette page; the API refuses at the field and shows the balance gates', async () => {
    const wp = await openPage(browser, TABLET);
    pages.push(wp);
    const { page, problems } = wp;
    await signIn(page, server.baseUrl, TECHNICIAN, PASSWORD);
    const list = await call(page, 'GET', `/api/volumetric-ware?search=${PIPETTE}`);
    wareId = list.body.items.find((w: any) => w.identifier === PIPETTE).id;

    await page.goto(`${server.baseUrl}/inventory/volumetric-ware/${wareId}`);
    await page.waitForSelector('[data-testid="ware-calibration"]');
    await page.screenshot({ path: '/tmp/glassui-ware-before.png', fullPage: true });
    await page.click('[data-testid="ware-plan-check"]');
    await page.waitForSelector('[data-testid="check-plan-form"]');
    expect(await page.$eval('#wareId', (el) => (el as HTMLSelectElement).value)).toBe(String(wareId));
    expect(await page.inputValue('#replicates')).toBe('10');

    // A balance past its calibration date (the demo's BAL-A2): refused, the gate shown as on the preparation plan.
    await pickOption(page, '#balanceId', 'BAL-A2');
    await page.fill('#conditions-waterTemperatureC', '20.5');
    await page.fill('#conditions-air-temperatureC', '21.0');
    await page.fill('#conditions-air-pressureHPa', '1012');
    await page.fill('#conditions-air-relativeHumidityPct', '45');
    await page.click('[data-testid="save-check-plan"]');
    await page.waitForSelector('[data-testid="gate-block"]');
    expect(await page.textContent('[data-testid="gate-block"]')).toMatch(/BAL-A2 calibration due .*overdue/);
    expect(await page.textContent('#balanceId-error')).toMatch(/overdue/);

    // A water temperature outside Tanaka 2001's range: the API's 400 lands on the field.
    await pickOption(page, '#balanceId', 'BAL-A1');
    await page.fill('#conditions-waterTemperatureC', '45');
    await page.click('[data-testid="save-check-plan"]');
    await page.waitForSelector('#conditions-waterTemperatureC-error');
    expect(await page.textContent('#conditions-waterTemperatureC-error')).toMatch(/\S/);
    expect(page.url()).toContain('/glassware/new');

    await page.fill('#conditions-waterTemperatureC', '20.5');
    await page.screenshot({ path: '/tmp/glassui-plan.png', fullPage: true });
    await page.click('[data-testid="save-check-plan"]');
    await page.waitForSelector('[data-testid="check-page"]');
    check = await text(page, 'check-identifier');
    expect(check).toMatch(/^VC-\d{4}-\d{4}$/);
    expect(await page.getAttribute('[data-testid="check-status"]', 'data-status')).toBe('planned');
    expect(real(problems)).toEqual([]);
  });

  it('the technician enters 10 readings at the bench, corrects one with a reason, and sees the live volumes and the result', async () => {
    const { page, problems } = pages[0]!;
    // A comma is refused at the field, before anything is sent.
    await page.fill('[data-testid="reading-value"]', '9,9743');
    await page.click('[data-testid="reading-submit"]');
    expect(await text(page, 'reading-value-error')).toMatch(/point/);

    for (const [i, r] of READINGS.entries()) {
      const typed = i === 2 ? '9.9379' : r; // replicate 3 mistyped, corrected below
      await page.fill('[data-testid="reading-value"]', typed);
      await page.waitForFunction(() => /mL/.test(document.querySelector('[data-testid="pending-volume"]')?.textContent ?? ''));
      if (i === 1) {
        // the first reading's volume at 20 °C is on its row; the running mean appears with the second
        await page.waitForSelector('[data-testid="running-mean"]');
        await page.screenshot({ path: '/tmp/glassui-bench.png', fullPage: true });
      }
      await page.click('[data-testid="reading-submit"]');
      if (i < READINGS.length - 1) await page.waitForFunction((n) => document.querySelector('[data-testid="next-replicate"]')?.textContent?.includes(`Replicate ${n} of 10`), i + 2);
      if (i === 2) {
        await page.click('[data-replicate="3"] [data-testid="correct-reading"]');
        await page.fill('[data-testid="correction-value"]', READINGS[2]!);
        await page.click('[data-testid="correction-submit"]');
        expect(await page.textContent('[data-testid="correction-form"]')).toMatch(/reason/i);
        await page.fill('[data-testid="correction-reason"]', 'Digits transposed when typing');
        await page.click('[data-testid="correction-submit"]');
        await page.waitForFunction(() => /superseded/.test(document.querySelector('[data-replicate="3"]')?.textContent ?? ''));
        expect(await page.textContent('[data-replicate="3"] [data-testid="reading-shown"]')).toContain('9.9739 g');
        expect(await page.textContent('[data-replicate="3"]')).toContain('9.9379 g');
      }
    }
    await page.waitForSelector('[data-testid="result-panel"]');
    await page.waitForSelector('[data-testid="tested-complete"]');
    const d = (await call(page, 'GET', `/api/volume-checks/${check}`)).body;
    expect(d.result.verdict).toBe('pass');
    expect(d.readings.filter((r: any) => r.current).map((r: any) => r.value)).toEqual(READINGS);
    expect(await page.getAttribute('[data-testid="result-verdict"]', 'data-verdict')).toBe('pass');
    const limit = await text(page, 'result-limit-source-0');
    expect(limit).toContain('ISO 648');
    expect(limit).not.toMatch(/METROLOGY|§/);
    // the mean shown is the stored mean rounded to the balance's places (0.1 mg → 4 decimals in mL)
    const mean: string = d.result.tested[0].mean.value;
    expect(await text(page, 'result-mean-0')).toContain(Number(mean).toFixed(4));
    await page.screenshot({ path: '/tmp/glassui-result.png', fullPage: true });
    // the technician cannot sign
    expect(await page.$('[data-testid="sign-prepared"]')).toBeNull();
    expect(real(problems)).toEqual([]);
  });

  it('a chemist signs it prepared, a second chemist verifies it, and the pipette shows calibrated with its next due date', async () => {
    const a = await openPage(browser, TABLET);
    pages.push(a);
    await signIn(a.page, server.baseUrl, CHEMIST, PASSWORD);
    await a.page.goto(`${server.baseUrl}/glassware/${check}`);
    await a.page.click('[data-testid="sign-prepared"]');
    await signInDialog(a.page);
    await a.page.waitForSelector('[data-testid="sign-done"]');
    expect(await a.page.getAttribute('[data-testid="check-status"]', 'data-status')).toBe('prepared');
    expect(a.problems).toEqual([]);

    const b = await openPage(browser, TABLET);
    pages.push(b);
    await signIn(b.page, server.baseUrl, CHEMIST2, PASSWORD);
    await b.page.goto(`${server.baseUrl}/glassware/${check}`);
    await b.page.waitForSelector('[data-testid="check-verification"]');
    expect(await b.page.isDisabled('[data-testid="sign-verified"]')).toBe(true);
    for (const box of await b.page.$$('[data-testid="check-verification"] input[type="checkbox"]')) await box.check();
    await b.page.screenshot({ path: '/tmp/glassui-verify.png', fullPage: true });
    await b.page.click('[data-testid="sign-verified"]');
    await signInDialog(b.page);
    await b.page.waitForSelector('[data-testid="sign-done"]');
    expect(await b.page.getAttribute('[data-testid="check-status"]', 'data-status')).toBe('verified');
    const d = (await call(b.page, 'GET', `/api/volume-checks/${check}`)).body;
    expect(d.nextDueOn).toMatch(/^\d{4}-\d{2}-\d{2}$/);
    expect(d.signatures.map((s: any) => s.meaning)).toEqual(['prepared', 'verified']);

    await b.page.click('[data-testid="check-ware-link"]');
    await b.page.waitForSelector('[data-testid="ware-calibration"]');
    await b.page.waitForFunction((id) => document.querySelector('[data-testid="ware-last-check"]')?.textContent === id, check);
    expect(await b.page.getAttribute('[data-testid="ware-calibration-status"]', 'data-calibration')).toBe('calibrated');
    expect(await text(b.page, 'ware-next-due')).toBe(d.nextDueOn);
    await b.page.screenshot({ path: '/tmp/glassui-ware-after.png', fullPage: true });

    // the list, filtered by the pipette, shows the check verified and passed
    await b.page.click('[data-testid="ware-checks-link"]');
    await b.page.waitForSelector(`[data-testid="check-row"][data-identifier="${check}"]`);
    expect(await b.page.textContent(`[data-testid="check-row"][data-identifier="${check}"]`)).toMatch(/Verified.*Passed/);
    expect(b.problems).toEqual([]);
  });

  it('the calibration certificate downloads as a PDF carrying the check identifier', async () => {
    const b = pages[2]!;
    await b.page.goto(`${server.baseUrl}/glassware/${check}`);
    const href = await b.page.getAttribute('[data-testid="certificate-link"]', 'href');
    expect(href).toBe(`/api/volume-checks/${check}/certificate.pdf`);
    const res = await b.context.request.get(`${server.baseUrl}${href}`);
    expect(res.status()).toBe(200);
    expect(res.headers()['content-type']).toMatch(/^application\/pdf/);
    const pdf = await pdfText(await res.body());
    expect(pdf).toContain(check);
    expect(pdf).toContain(PIPETTE);
  });
});
