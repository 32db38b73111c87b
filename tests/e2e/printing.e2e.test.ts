/**
 * Printing and scanning through a real browser. A technician opens a demo preparation's print page: the
 * prep-sheet frame loads a server-rendered PDF (headless Chromium may not draw PDFs in frames, so the
 * network response is checked), the label preview loads, 3 labels are printed, then a reprint needs a
 * reason and shows in the history as a reprint. QA sees the prep sheet but no print button. The scan
 * shortcut ("/") and a scanner typing fast with nothing focused both open a record from its identifier.
 * An admin creates a label template; a layout that does not fit the page is refused at the field.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page, Response } from 'playwright-core';
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

const isPdf = (r: Response) => r.status() === 200 && (r.headers()['content-type'] ?? '').startsWith('application/pdf');

/** The identifier of the first demo preparation with a result (the seeded lead standard is complete). */
async function demoIdentifier(page: Page): Promise<string> {
  const res = await page.request.get(`${server.baseUrl}/api/preparations?pageSize=50`);
  expect(res.status()).toBe(200);
  const body = (await res.json()) as { items: Array<{ identifier: string; stage: string; status: string }> };
  const complete = body.items.find((p) => p.stage === 'complete' && p.status !== 'expired' && p.status !== 'discarded');
  expect(complete, 'a complete demo preparation').toBeTruthy();
  return complete!.identifier;
}

/** Chromium's own PDF viewer loads chrome:// resources when a frame shows a PDF: not a request to another host. */
const real = (problems: string[]) => problems.filter((p) => !/request to another host: chrome(-extension)?:\/\//.test(p));

const rows = (page: Page) => page.$$eval('[data-testid="print-row"]', (els) => els.map((e) => (e.textContent ?? '').replace(/\s+/g, ' ').trim()));

describe('printing and scanning', () => {
  it('when a technician prints 3 labels and then reprints with a reason, then the history shows the original and the reprint', async () => {
    const { page, problems, context } = await openPage(browser, { width: 1180, height: 820 });
    try {
      await signIn(page, server.baseUrl, 'technician@harbourside.example', PASSWORD);
      const identifier = await demoIdentifier(page);

      await page.goto(`${server.baseUrl}/preparations/${identifier}`);
      await page.waitForSelector('[data-testid="open-print"]');
      const sheetResponse = page.waitForResponse((r) => r.url().includes(`/api/preparations/${identifier}/prep-sheet.pdf`));
      const previewResponse = page.waitForResponse((r) => r.url().includes(`/api/preparations/${identifier}/labels-preview.pdf`));
      await page.click('[data-testid="open-print"]');
      await page.waitForSelector('[data-testid="print-identifier"]');
      expect((await page.textContent('[data-testid="print-identifier"]'))?.trim()).toBe(identifier);

      const sheet = await sheetResponse;
      expect(isPdf(sheet), `prep sheet ${sheet.status()} ${sheet.headers()['content-type']}`).toBe(true);
      // The frame's body goes to the browser's PDF viewer; fetch the same URL for the bytes.
      const sheetBytes = await page.request.get(sheet.url());
      expect((await sheetBytes.body()).subarray(0, 5).toString()).toBe('%PDF-'); // PDF header (ISO 32000-1 §7.5.2)
      expect(await page.getAttribute('[data-testid="prep-sheet-open"]', 'href')).toBe(`/api/preparations/${identifier}/prep-sheet.pdf`);

      // The demo record is not verified: the page says the labels carry the unverified mark.
      expect(await page.textContent('[data-testid="unverified-warning"]')).toContain('NOT VERIFIED – DO NOT USE FOR RESULTS');

      const preview = await previewResponse;
      expect(isPdf(preview), `preview ${preview.status()}`).toBe(true);
      expect(await page.$$eval('[data-testid="template-option"]', (els) => els.length)).toBeGreaterThan(0);
      expect(await page.textContent('[data-testid="template-picker"]')).toMatch(/\d+ × \d+ mm/); // size shown with each template

      // Three copies with the big + button; the preview follows (copies=3).
      const preview3 = page.waitForResponse((r) => r.url().includes('/labels-preview.pdf') && r.url().includes('copies=3'));
      await page.click('[data-testid="copies-plus"]');
      await page.click('[data-testid="copies-plus"]');
      expect(await page.inputValue('[data-testid="label-copies"]')).toBe('3');
      expect(isPdf(await preview3)).toBe(true);
      expect(await page.$eval('[data-testid="print-labels"]', (b) => b.getBoundingClientRect().height)).toBeGreaterThanOrEqual(48);
      expect(await page.$eval('[data-testid="copies-plus"]', (b) => b.getBoundingClientRect().height)).toBeGreaterThanOrEqual(48);
      await page.waitForSelector('[data-testid="print-history-empty"]');
      expect((await page.textContent('[data-testid="print-labels"]'))?.trim()).toBe('Print 3 labels');
      await screenshot(page, 'printing-before-print');

      // Print: the print is recorded (201) and its PDF opens in a new tab.
      const created = page.waitForResponse((r) => r.url().endsWith(`/api/preparations/${identifier}/label-prints`) && r.request().method() === 'POST');
      const popup = context.waitForEvent('page');
      const tabRequest = context.waitForEvent('request', (r) => /\/api\/label-prints\/\d+\/labels\.pdf$/.test(r.url()));
      await page.click('[data-testid="print-labels"]');
      const createdRes = await created;
      expect(createdRes.status()).toBe(201);
      const first = (await createdRes.json()) as { print: { number: number; isReprint: boolean; copies: number }; pdfUrl: string };
      expect(first.print).toMatchObject({ number: 1, isReprint: false, copies: 3 });
      const tab = await popup;
      // The new tab asks for the print's PDF (headless Chromium may hand it to the viewer or a download).
      expect((await tabRequest).url()).toBe(`${server.baseUrl}${first.pdfUrl}`);
      await tab.close();
      const printedPdf = await page.request.get(`${server.baseUrl}${await page.getAttribute('[data-testid="last-print-pdf"]', 'href')}`);
      expect(printedPdf.status()).toBe(200);
      expect(printedPdf.headers()['content-type']).toMatch(/^application\/pdf/);

      await expect.poll(() => rows(page)).toHaveLength(1);
      expect((await rows(page))[0]).toMatch(/Original/);
      expect((await rows(page))[0]).toContain('Priya Lindqvist');

      // Same template, same version: a reprint. Without a reason the page refuses before asking the server.
      await page.waitForSelector('[data-testid="reprint-fields"]');
      expect((await page.textContent('[data-testid="print-labels"]'))?.trim()).toBe('Reprint 3 labels');
      await page.click('[data-testid="print-labels"]');
      await page.waitForSelector('#reprint-reason-error');
      expect(await page.textContent('#reprint-reason-error')).toContain('reason');
      expect(await page.getAttribute('[data-testid="reprint-reason"]', 'aria-invalid')).toBe('true');
      await screenshot(page, 'printing-reprint-needs-reason', false);

      await page.fill('[data-testid="reprint-reason"]', 'Label smudged by methanol');
      await page.check('[data-testid="reprint-destroyed"]');
      const popup2 = context.waitForEvent('page');
      const reprinted = page.waitForResponse((r) => r.url().endsWith('/label-prints') && r.request().method() === 'POST');
      await page.click('[data-testid="print-labels"]');
      const reprintedRes = await reprinted;
      expect(reprintedRes.status()).toBe(201);
      expect(((await reprintedRes.json()) as { print: { isReprint: boolean; number: number } }).print).toMatchObject({ isReprint: true, number: 2 });
      await (await popup2).close();

      await expect.poll(() => rows(page)).toHaveLength(2);
      const [newest, oldest] = await rows(page); // newest first
      expect(newest!.toLowerCase()).toContain('reprint');
      expect(newest).toContain('Label smudged by methanol');
      expect(oldest).toMatch(/Original/);
      expect(await page.textContent('[data-testid="print-counts"]')).toMatch(/1 original print, 1 reprint, 6 labels/);
      await screenshot(page, 'printing-history');
      expect(real(problems)).toEqual([]);
    } finally {
      await context.close();
    }
  });

  it('when QA opens the print page, then the prep sheet loads and there is no print button; the scan shortcut opens a record', async () => {
    const { page, problems, context } = await openPage(browser, { width: 1280, height: 800 });
    try {
      await signIn(page, server.baseUrl, 'qa@harbourside.example', PASSWORD);
      const identifier = await demoIdentifier(page);
      const sheetResponse = page.waitForResponse((r) => r.url().includes(`/api/preparations/${identifier}/prep-sheet.pdf`));
      await page.goto(`${server.baseUrl}/preparations/${identifier}/print`);
      await page.waitForSelector('[data-testid="print-not-allowed"]');
      expect(isPdf(await sheetResponse)).toBe(true);
      expect(await page.$('[data-testid="print-labels"]')).toBeNull();
      expect(await page.$('[data-testid="print-controls"]')).toBeNull();
      await screenshot(page, 'printing-qa');

      // "/" with nothing focused puts the cursor in the scan box; the scanner types and presses Enter.
      await page.goto(`${server.baseUrl}/`);
      await page.waitForSelector('[data-testid="home-role"]');
      await page.evaluate(() => (document.activeElement as HTMLElement | null)?.blur());
      await page.keyboard.press('/');
      expect(await page.evaluate(() => document.activeElement?.id)).toBe('scan-box');
      expect(await page.inputValue('[data-testid="scan-box"]')).toBe(''); // the "/" itself is not typed
      await page.keyboard.type(identifier);
      await screenshot(page, 'scan-box', false);
      await page.keyboard.press('Enter');
      await page.waitForURL(`**/preparations/${identifier}`);
      await page.waitForSelector('[data-testid="detail-identifier"]');
      expect((await page.textContent('[data-testid="detail-identifier"]'))?.trim()).toBe(identifier);

      // A scanner typing at its own speed while nothing has focus: caught without the shortcut.
      await page.goto(`${server.baseUrl}/`);
      await page.waitForSelector('[data-testid="home-role"]');
      await page.evaluate(() => (document.activeElement as HTMLElement | null)?.blur());
      await page.keyboard.type(identifier.toLowerCase(), { delay: 5 });
      await page.keyboard.press('Enter');
      await page.waitForURL(`**/preparations/${identifier}`);
      await page.waitForSelector('[data-testid="detail-identifier"]');

      // A balance identifier opens the balance's inventory page; an unknown code says "not found".
      await page.fill('[data-testid="scan-box"]', 'BAL-A1');
      await page.press('[data-testid="scan-box"]', 'Enter');
      await page.waitForURL(/\/inventory\/balances\/\d+$/);
      await page.fill('[data-testid="scan-box"]', 'NO-SUCH-CODE-42');
      await page.press('[data-testid="scan-box"]', 'Enter');
      await page.waitForSelector('[data-testid="scan-message"]');
      expect(await page.textContent('[data-testid="scan-message"]')).toContain('Nothing found for “NO-SUCH-CODE-42”');
      expect(real(problems)).toEqual([]);
    } finally {
      await context.close();
    }
  });

  it('when an admin creates a label template, then a layout that does not fit is refused at the field and a fitting one is listed', async () => {
    const { page, problems, context } = await openPage(browser, { width: 1280, height: 800 });
    try {
      await signIn(page, server.baseUrl, 'admin@harbourside.example', PASSWORD);
      await page.click('[data-testid="nav-label-templates"]');
      await page.waitForSelector('[data-testid="templates-table"]');
      const before = await page.$$eval('[data-testid="template-row"]', (els) => els.length);
      await page.click('[data-testid="template-new"]');
      await page.fill('[name="name"]', 'Freezer vial 30×15 small');
      await page.fill('[name="widthMm"]', '30');
      await page.fill('[name="heightMm"]', '15');
      await page.selectOption('[name="content"]', 'small');
      await page.fill('[name="rows"]', '17');
      await page.fill('[name="columns"]', '7'); // 7 × 30 mm = 210 mm + 2 × 5 mm margin/gaps > 210 mm (A4, ISO 216)
      await page.fill('[name="marginLeftMm"]', '5');
      await page.fill('[name="marginTopMm"]', '10');
      await page.click('[data-testid="template-submit"]');
      await page.waitForSelector('#columns-error');
      expect(await page.textContent('#columns-error')).toMatch(/210 mm wide/);
      await screenshot(page, 'label-template-error', false);
      await page.fill('[name="columns"]', '6'); // 5 + 6 × 30 = 185 mm; 10 + 17 × 15 = 265 mm (arithmetic)
      await page.click('[data-testid="template-submit"]');
      await page.waitForSelector('[data-testid="template-saved"]');
      await expect.poll(() => page.$$eval('[data-testid="template-row"]', (els) => els.length)).toBe(before + 1);
      expect(await page.textContent('[data-testid="templates-table"]')).toContain('A4 sheet, 17 rows × 6 columns (102 per page)');
      await screenshot(page, 'label-templates');
      expect(real(problems)).toEqual([]);
    } finally {
      await context.close();
    }
  });
});
