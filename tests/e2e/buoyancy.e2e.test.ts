/**
 * The buoyancy factor table page in a real browser: a technician opens it from the navigation, sees the table at
 * the lab's room conditions, gets field errors for an incomplete entry, enters conditions, and the page shows the
 * server's numbers; "Print for the balance" links to the PDF of the same conditions.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser } from 'playwright-core';
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

describe('buoyancy table page', () => {
  it('shows the factors at the lab’s conditions, field errors for an incomplete entry, the entered conditions’ factors and a print link', async () => {
    const { page, problems, context } = await openPage(browser);
    try {
      await signIn(page, server.baseUrl, 'technician@harbourside.example', PASSWORD);
      await page.click('[data-testid="nav-buoyancy"]');
      await page.waitForSelector('[data-testid="buoyancy-row"]');
      expect(await page.textContent('[data-testid="buoyancy-air"]')).toMatch(/lab’s room conditions/);
      const rows = await page.$$('[data-testid="buoyancy-row"]');
      expect(rows.length).toBeGreaterThanOrEqual(15);

      // only the temperature: the page asks for the pressure and humidity too, at the fields
      await page.fill('#bt-t', '22');
      await page.click('[data-testid="buoyancy-apply"]');
      expect(await page.textContent('[data-testid="error-p"]')).toMatch(/air pressure too/);
      expect(await page.textContent('[data-testid="error-rh"]')).toMatch(/relative humidity too/);

      await page.fill('#bt-p', '960');
      await page.fill('#bt-rh', '45');
      await page.click('[data-testid="buoyancy-apply"]');
      await page.waitForFunction(() => /entered/.test(document.querySelector('[data-testid="buoyancy-air"]')?.textContent ?? ''));
      expect(await page.textContent('[data-testid="buoyancy-air"]')).toContain('ρa = 1.1282 kg/m³'); // CIPM-2007 at 22 °C, 960 hPa, 45 % [C, METROLOGY §2.2]
      expect(await page.$('[data-testid="error-p"]')).toBeNull();

      // the page shows exactly the server's display strings
      const api = await page.evaluate(async () => (await fetch('/api/calc/buoyancy-table?t=22&p=960&rh=45')).json());
      const shown = await page.$$eval('[data-testid="buoyancy-row"]', (trs) => trs.map((tr) => [tr.querySelector('[data-testid="factor"]')!.textContent, tr.querySelector('[data-testid="inverse"]')!.textContent]));
      expect(shown).toEqual(api.rows.map((r: { factorDisplay: string; readingPerGramDisplay: string }) => [r.factorDisplay, r.readingPerGramDisplay]));
      const lead = await page.$$eval('[data-testid="buoyancy-row"]', (trs) => trs.find((tr) => tr.textContent?.includes('Lead(II) nitrate'))?.querySelector('[data-testid="factor"]')?.textContent);
      expect(lead).toBe('1.0001081'); // [C, METROLOGY §2.2 at real air]

      const href = await page.getAttribute('[data-testid="buoyancy-print"]', 'href');
      expect(href).toBe('/api/calc/buoyancy-table.pdf?t=22&p=960&rh=45');
      const pdf = await page.evaluate(async (u) => {
        const r = await fetch(u);
        return { status: r.status, type: r.headers.get('content-type') };
      }, href!);
      expect(pdf).toEqual({ status: 200, type: 'application/pdf' });
      await screenshot(page, 'buoyancy-table');
      expect(problems).toEqual([]);
    } finally {
      await context.close();
    }
  });
});
