/**
 * A broken seal in the browser (issue 10 §1): the displayed concentration of the demo's verified stock is changed
 * behind the app's back through a second SQLite connection; QA then sees "Seal broken" (never "Verified") on the
 * list, on the record with what differs, and on the trace.
 */
import sqlite3 from 'sqlite3';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser } from 'playwright-core';
import { launchBrowser, openPage, signIn, startServer, type RunningServer, type WatchedPage } from './harness.ts';

const PASSWORD = 'bench-demo-2026'; // the seeded demo lab's shared demo password (README)
const QA = 'qa@harbourside.example';

let server: RunningServer;
let browser: Browser;
let w: WatchedPage;

function rawRun(path: string, sql: string, params: unknown[] = []): Promise<Array<Record<string, unknown>>> {
  const db = new sqlite3.Database(path);
  return new Promise((res, rej) => db.all(sql, params, (e, rows) => db.close(() => (e ? rej(e) : res(rows as Array<Record<string, unknown>>)))));
}

beforeAll(async () => {
  server = await startServer();
  browser = await launchBrowser();
  w = await openPage(browser, { width: 820, height: 1180 });
});

afterAll(async () => {
  await w?.context.close().catch(() => undefined);
  await browser?.close();
  await server?.stop();
});

describe('seal broken', () => {
  it('when a verified record\'s concentration is changed in the database, then the list, the record and the trace say "Seal broken"', async () => {
    const [pb] = await rawRun(server.dbPath, "SELECT id, identifier FROM preparations WHERE status = 'verified' AND kind = 'stock' ORDER BY id LIMIT 1");
    const identifier = String(pb!.identifier);
    await rawRun(server.dbPath, "UPDATE preparations SET concentration_display = '1500.0 mg/L' WHERE id = ?", [pb!.id]);
    const { page } = w;
    await signIn(page, server.baseUrl, QA, PASSWORD);

    await page.goto(`${server.baseUrl}/preparations?tab=all&search=${encodeURIComponent(identifier)}`);
    const row = page.locator('[data-testid="prep-row"]', { hasText: identifier });
    await row.waitFor();
    expect(await row.locator('[data-testid="prep-row-status"]').getAttribute('data-status')).toBe('seal_broken');
    expect(await row.locator('[data-testid="prep-row-status"]').textContent()).toContain('Seal broken');

    await row.click();
    await page.waitForSelector('[data-testid="seal-broken"]');
    expect(await page.getAttribute('[data-testid="detail-status"]', 'data-status')).toBe('seal_broken');
    expect(await page.textContent('[data-testid="seal-broken-problems"]')).toContain('concentration_display');

    await page.goto(`${server.baseUrl}/trace?id=${encodeURIComponent(identifier)}`);
    await page.getByText('Seal broken').first().waitFor();
    expect(w.problems).toEqual([]);
  });
});
