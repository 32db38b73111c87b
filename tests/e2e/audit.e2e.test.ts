/**
 * The audit trail page in a real browser: a failed and a good sign-in show up in the table in the lab
 * time zone, the filters narrow it and the CSV link carries them, "Check the chain" reports the chain
 * intact, and a chemist neither sees the page in the navigation nor can open it.
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

describe('audit trail page', () => {
  it('when QA opens the trail, then sign-ins are listed, filters and export work, and the chain checks out', async () => {
    // A failed sign-in first (anonymous entry with the email tried).
    const failed = await fetch(`${server.baseUrl}/api/auth/login`, {
      method: 'POST',
      headers: { 'Content-Type': 'application/json' },
      body: JSON.stringify({ email: 'chemist2@harbourside.example', password: 'not-the-password' }),
    });
    expect(failed.status).toBe(401);

    const { page, problems, context } = await openPage(browser);
    try {
      await signIn(page, server.baseUrl, 'qa@harbourside.example', PASSWORD);
      await page.click('[data-testid="nav-audit"]');
      await page.waitForSelector('[data-testid="audit-table"]');
      expect(await page.textContent('h1')).toBe('Audit trail');
      // Default lab time zone Europe/London (0001-foundation); the zone is named in the column header.
      expect(await page.textContent('[data-testid="audit-table"] thead')).toContain('(Europe/London)');
      const firstRow = page.locator('[data-testid^="audit-row-"]').first();
      expect(await firstRow.textContent()).toContain('Signed in');
      expect(await firstRow.textContent()).toContain('Tomasz Achterberg');

      await page.selectOption('#audit-action', 'sign_in_failed');
      await page.click('[data-testid="audit-apply"]');
      await page.waitForURL(/action=sign_in_failed/);
      await page.waitForFunction(() => document.querySelector('[data-testid="audit-total"]')?.textContent?.startsWith('1 entry'));
      const row = await page.locator('[data-testid^="audit-row-"]').first().textContent();
      expect(row).toContain('Sign-in failed');
      expect(row).toContain('chemist2@harbourside.example');
      expect(row).toContain('(not signed in)');

      const href = await page.getAttribute('[data-testid="audit-export"]', 'href');
      expect(href).toBe('/api/audit/export.csv?action=sign_in_failed');
      const csv = await page.request.get(`${server.baseUrl}${href}`);
      expect(csv.status()).toBe(200);
      expect(csv.headers()['content-disposition']).toMatch(/^attachment;/);
      const lines = (await csv.text()).split('\r\n');
      expect(lines[0]).toBe('id,occurred_at_utc,actor_id,actor_name,action,entity,entity_id,changes,reason,prev_hash,hash,session_id');
      expect(lines.slice(1).filter(Boolean)).toHaveLength(1);

      await page.click('[data-testid="audit-verify"]');
      const verdict = page.locator('[data-testid="audit-verify-result"]');
      await verdict.waitFor();
      expect(await verdict.textContent()).toMatch(/^Chain intact: \d+ entries checked/);
      // The 48 px touch-target rule (src/components/ui/button.tsx).
      const box = await page.locator('[data-testid="audit-verify"]').boundingBox();
      expect(box!.height).toBeGreaterThanOrEqual(48);
      await screenshot(page, 'e2e-audit-trail');
      expect(problems).toEqual([]);
    } finally {
      await context.close();
    }
  });

  it('when a chemist signs in, then there is no audit item in the navigation and /audit is refused', async () => {
    const { page, problems, context } = await openPage(browser);
    try {
      await signIn(page, server.baseUrl, 'chemist@harbourside.example', PASSWORD);
      expect(await page.locator('[data-testid="nav-audit"]').count()).toBe(0);
      await page.goto(`${server.baseUrl}/audit`);
      await page.waitForSelector('[data-testid="not-allowed"]');
      expect(await page.locator('[data-testid="audit-table"]').count()).toBe(0);
      expect(problems).toEqual([]);
    } finally {
      await context.close();
    }
  });
});
