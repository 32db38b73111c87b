/**
 * Inventory pages in a real browser against a real server on a fresh database (the seeded demo lab):
 * a chemist searches, sorts and pages the materials (the server does all three in SQL), opens a lot,
 * uploads a PDF certificate and sees version 1; a bad file is refused at the file field; a technician
 * sees the same records without any edit control. Expected rows come from the API itself, so the test
 * checks that the page shows the server's answer faithfully (strings exactly as sent).
 */
import { createHash } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { launchBrowser, openPage, screenshot, signIn, startServer, type RunningServer } from './harness.ts';

const PASSWORD = 'bench-demo-2026'; // the seeded demo lab's shared demo password (README)
const TABLET = { width: 820, height: 1180 };
const DESKTOP = { width: 1280, height: 800 };

type Material = { id: number; name: string; lot: string; expiresOn: string | null; purity: { value: string; expandedUncertainty: string | null; k: string | null } };
type Page_ = { items: Material[]; total: number; page: number; pageSize: number };

/** A minimal but well-formed PDF (ISO 32000-1 §7.5: header, one object, xref, trailer, %%EOF). */
function tinyPdf(): Buffer {
  return Buffer.from(
    '%PDF-1.4\n1 0 obj\n<< /Type /Catalog >>\nendobj\nxref\n0 2\n0000000000 65535 f \n0000000009 00000 n \ntrailer\n<< /Size 2 /Root 1 0 R >>\nstartxref\n52\n%%EOF\n',
    'latin1',
  );
}

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

async function apiGet<T>(page: Page, path: string): Promise<T> {
  const res = await page.request.get(`${server.baseUrl}${path}`);
  expect(res.status(), `GET ${path}`).toBe(200);
  return (await res.json()) as T;
}

/** The list has settled: no placeholder page is showing. */
async function settled(page: Page) {
  await page.waitForSelector('[data-testid="inventory-table"]:not([aria-busy])');
}

async function rowNames(page: Page): Promise<string[]> {
  return page.locator('[data-testid="inventory-row"] td:first-child [data-testid="record-link"] > span:first-child').allTextContents();
}

/** The page must never be wider than the window; wide tables scroll inside their own box. */
async function noPageOverflow(page: Page) {
  const { scroll, inner } = await page.evaluate(() => ({ scroll: document.documentElement.scrollWidth, inner: window.innerWidth }));
  expect(scroll).toBeLessThanOrEqual(inner);
}

describe('inventory pages', () => {
  it('when a chemist searches, sorts, pages and uploads a certificate, then the page shows exactly what the server holds', async () => {
    const { page, problems, context } = await openPage(browser, DESKTOP);
    try {
      await signIn(page, server.baseUrl, 'chemist@harbourside.example', PASSWORD);

      // Enough lots for two pages of 25: add 20 reagent-grade lots through the API as the chemist.
      for (let i = 1; i <= 20; i += 1) {
        const n = String(i).padStart(2, '0');
        const res = await page.request.post(`${server.baseUrl}/api/materials`, {
          data: {
            name: `Sodium sulfate check lot ${n}`,
            formula: 'Na2SO4',
            analytes: [{ name: 'sulfate', formula: 'SO4' }],
            grade: 'reagent',
            producer: 'Fenwick Scientific',
            lot: `FS-E2E-${n}`,
            purity: { value: '0.9950', basis: 'as-is' },
            expiresOn: '2029-12-31',
            status: 'accepted',
          },
        });
        expect(res.status(), await res.text()).toBe(201);
      }
      const all = await apiGet<Page_>(page, '/api/materials?pageSize=200');
      expect(all.total).toBeGreaterThan(25);

      // Open Materials from the navigation.
      await page.click('[data-testid="nav-inventory-materials"]');
      await page.waitForSelector('[data-testid="inventory-list-materials"]');
      await settled(page);
      expect(await page.textContent('[data-testid="row-count"]')).toBe(`Rows 1–25 of ${all.total}`);
      expect(await page.locator('[data-testid="inventory-row"]').count()).toBe(25);
      expect(await page.getAttribute('th:has([data-testid="sort-name"])', 'aria-sort')).toBe('ascending');

      // Decimal strings exactly as stored: the NaCl CRM keeps its trailing zeros (seed/demo-data.ts).
      const nacl = all.items.find((m) => m.name === 'Sodium chloride')!;
      const naclRow = page.locator('[data-testid="inventory-row"]', { hasText: 'Sodium chloride' });
      expect(await naclRow.locator('[data-testid="purity-cell"]').textContent()).toBe(
        `${nacl.purity.value} ± ${nacl.purity.expandedUncertainty} (k = ${nacl.purity.k})`,
      );
      expect(nacl.purity.value).toBe('0.99970');

      // Expired lots carry the red badge: usable on the expiry day, expired from the next (REQUIREMENTS TR-11).
      const today = await page.evaluate(() => {
        const d = new Date();
        return `${d.getFullYear()}-${String(d.getMonth() + 1).padStart(2, '0')}-${String(d.getDate()).padStart(2, '0')}`;
      });
      const firstPage = await apiGet<Page_>(page, '/api/materials?sort=name&dir=asc&page=1&pageSize=25');
      const expiredOnPage = firstPage.items.filter((m) => m.expiresOn !== null && m.expiresOn < today).length;
      expect(expiredOnPage).toBeGreaterThan(0); // the seed's sodium fluoride expired on 2026-06-30
      expect(await page.locator('[data-testid="expired-badge"]').count()).toBe(expiredOnPage);
      expect(await rowNames(page)).toEqual(firstPage.items.map((m) => m.name));
      await screenshot(page, 'e2e-inventory-materials-desktop', false);
      await noPageOverflow(page);

      // Search (debounced, done by the server) and keep it in the address bar.
      await page.fill('[data-testid="list-search"]', 'nitrate');
      await page.waitForURL(/search=nitrate/);
      const nitrates = await apiGet<Page_>(page, '/api/materials?search=nitrate&sort=name&dir=asc&page=1&pageSize=25');
      expect(nitrates.total).toBeGreaterThanOrEqual(3); // lead(II), sodium and potassium nitrate in the seed
      await expect.poll(() => page.textContent('[data-testid="row-count"]')).toBe(`Rows 1–${nitrates.total} of ${nitrates.total}`);
      await settled(page);
      expect(await rowNames(page)).toEqual(nitrates.items.map((m) => m.name));

      // Sort by name, descending: the header says so (aria-sort) and the order is the server's.
      await page.click('[data-testid="sort-name"]');
      await page.waitForURL(/dir=desc/);
      await settled(page);
      expect(await page.getAttribute('th:has([data-testid="sort-name"])', 'aria-sort')).toBe('descending');
      const desc = await apiGet<Page_>(page, '/api/materials?search=nitrate&sort=name&dir=desc&page=1&pageSize=25');
      expect(await rowNames(page)).toEqual(desc.items.map((m) => m.name));

      // A bookmarked view opens the same way.
      await page.reload();
      await page.waitForSelector('[data-testid="inventory-list-materials"]');
      await settled(page);
      expect(await page.inputValue('[data-testid="list-search"]')).toBe('nitrate');
      expect(await rowNames(page)).toEqual(desc.items.map((m) => m.name));

      // Clear the search, sort by lot, go to page 2.
      await page.fill('[data-testid="list-search"]', '');
      await page.waitForURL((u) => !u.search.includes('search='));
      await page.click('[data-testid="sort-lot"]');
      await page.waitForURL(/sort=lot/);
      await settled(page);
      await page.click('[data-testid="page-next"]');
      await page.waitForURL(/page=2/);
      await settled(page);
      const page2 = await apiGet<Page_>(page, '/api/materials?sort=lot&dir=asc&page=2&pageSize=25');
      expect(await page.textContent('[data-testid="row-count"]')).toBe(`Rows 26–${all.total} of ${all.total}`);
      expect(await page.textContent('[data-testid="page-of"]')).toBe('Page 2 of 2');
      expect(await rowNames(page)).toEqual(page2.items.map((m) => m.name));
      const lots = await page.locator('[data-testid="inventory-row"] td:nth-child(3)').allTextContents();
      expect(lots).toEqual(page2.items.map((m) => m.lot));

      // Tablet: the table scrolls inside its box, the page does not.
      await page.setViewportSize(TABLET);
      await noPageOverflow(page);
      await screenshot(page, 'e2e-inventory-materials-tablet', false);
      await page.setViewportSize(DESKTOP);

      // Open the lead(II) nitrate lot.
      const lead = all.items.find((m) => m.name === 'Lead(II) nitrate')!;
      await page.goto(`${server.baseUrl}/inventory/materials?search=lead`);
      await settled(page);
      await page.click('[data-testid="record-link"]:has-text("Lead(II) nitrate")');
      await page.waitForURL(new RegExp(`/inventory/materials/${lead.id}$`));
      await page.waitForSelector('[data-testid="inventory-detail-materials"]');
      expect(await page.textContent('[data-testid="detail-title"]')).toBe('Lead(II) nitrate');
      expect(await page.textContent('[data-testid="detail-purity"]')).toBe(`${lead.purity.value} ± ${lead.purity.expandedUncertainty} (k = ${lead.purity.k})`);
      expect(await page.textContent('[data-testid="hazards"]')).toContain('Follow the SDS, local regulations and the laboratory');
      expect(await page.textContent('[data-testid="hazards"]')).toContain('GHS08');
      await page.waitForSelector('[data-testid="certificates-empty"]');

      // A text file named .pdf is refused by its content (415), and the message sits at the file field.
      await page.setInputFiles('#certificate-file', { name: 'not-really.pdf', mimeType: 'application/pdf', buffer: Buffer.from('hello, this is text') });
      await page.click('[data-testid="certificate-upload-submit"]');
      await page.waitForSelector('[data-testid="certificate-file-error"]');
      expect((await page.textContent('[data-testid="certificate-file-error"]'))?.length).toBeGreaterThan(5);
      expect(await page.getAttribute('#certificate-file', 'aria-invalid')).toBe('true');
      expect(await page.locator('[data-testid="certificate-row"]').count()).toBe(0);
      // Chromium logs every 4xx response as a console error; this 415 is the one the step provoked.
      const provoked = problems.findIndex((p) => /status of 415/.test(p) && /\/api\/materials\/\d+\/certificates/.test(p));
      expect(provoked).toBeGreaterThanOrEqual(0);
      problems.splice(provoked, 1);

      // The real certificate: version 1, with its SHA-256 (FIPS 180-4, computed here by node:crypto).
      const pdf = tinyPdf();
      const sha = createHash('sha256').update(pdf).digest('hex');
      await page.setInputFiles('#certificate-file', { name: 'NRM-C-24-0931 v1.pdf', mimeType: 'application/pdf', buffer: pdf });
      await page.fill('#certificate-note', 'Certificate as received with the lot');
      await page.click('[data-testid="certificate-upload-submit"]');
      await page.waitForSelector('[data-testid="certificate-row"]');
      expect(await page.textContent('[data-testid="certificate-version"]')).toBe('1');
      const row = page.locator('[data-testid="certificate-row"]').first();
      expect(await row.textContent()).toContain(`${sha.slice(0, 12)}…`);
      expect(await row.textContent()).toContain('Dr. Maren Tollefsen');
      expect(await row.textContent()).toContain('Certificate as received with the lot');
      expect(await page.textContent('[data-testid="certificate-download"]')).toBe('NRM-C-24-0931 v1.pdf');
      const href = (await page.getAttribute('[data-testid="certificate-download"]', 'href'))!;
      const file = await page.request.get(`${server.baseUrl}${href}`);
      expect(file.status()).toBe(200);
      expect(Buffer.from(await file.body()).equals(pdf)).toBe(true);
      expect(file.headers()['content-disposition']).toContain('attachment');
      await screenshot(page, 'e2e-inventory-material-detail-desktop');

      // Edit: a wrong purity is stopped at its field before anything is sent; a real change is saved.
      await page.click('[data-testid="edit-button"]');
      await page.waitForSelector('[data-testid="edit-form"]');
      await page.fill('form [name="purity.value"]', '1.5');
      await page.click('[data-testid="record-form-submit"]');
      await page.waitForSelector('#purity-value-error');
      expect(await page.textContent('#purity-value-error')).toMatch(/at most 1/);
      await page.fill('form [name="purity.value"]', lead.purity.value);
      // The schema takes U with k or u, not both (shared/schemas/inventory.ts); the seeded lot lists both, so keep U and k.
      await page.fill('form [name="purity.standardUncertainty"]', '');
      await page.fill('form [name="storage"]', 'Room temperature, dry; dry 2 h at 105 °C, cool in a desiccator');
      await page.click('[data-testid="record-form-submit"]');
      await page.waitForSelector('[data-testid="inventory-detail-materials"] >> text=Saved.');
      expect(await page.textContent('[data-testid="inventory-detail-materials"]')).toContain('cool in a desiccator');
      const saved = await apiGet<{ storage: string; purity: { value: string } }>(page, `/api/materials/${lead.id}`);
      expect(saved.storage).toBe('Room temperature, dry; dry 2 h at 105 °C, cool in a desiccator');
      expect(saved.purity.value).toBe(lead.purity.value);

      await page.setViewportSize(TABLET);
      await noPageOverflow(page);
      await screenshot(page, 'e2e-inventory-material-detail-tablet');
      await page.setViewportSize(DESKTOP);

      // Retire one of the check lots: the reason is required, then it is retired (never deleted).
      const check = all.items.find((m) => m.lot === 'FS-E2E-20')!;
      await page.goto(`${server.baseUrl}/inventory/materials/${check.id}`);
      await page.click('[data-testid="retire-button"]');
      await page.waitForSelector('[data-testid="retire-dialog"][open]');
      await page.click('[data-testid="retire-confirm"]');
      await page.waitForSelector('#retire-reason-error');
      await page.fill('#retire-reason', 'Check lot made for the browser test');
      await page.click('[data-testid="retire-confirm"]');
      await page.waitForSelector('[data-testid="retired-banner"]');
      expect(await page.textContent('[data-testid="retired-banner"]')).toContain('Check lot made for the browser test');
      expect(await page.locator('[data-testid="edit-button"]').count()).toBe(0);
      expect((await apiGet<{ status: string }>(page, `/api/materials/${check.id}`)).status).toBe('retired');

      // A duplicate balance identifier comes back 409 and is shown at the identifier field.
      await page.goto(`${server.baseUrl}/inventory/balances/new`);
      await page.waitForSelector('[data-testid="create-form"]');
      await page.fill('form [name="identifier"]', 'BAL-A1');
      await page.fill('form [name="description"]', 'Second unit with a clashing label');
      await page.fill('form [name="capacityG"]', '220');
      await page.fill('form [name="readabilityMg"]', '0.1');
      await page.fill('form [name="repeatabilitySdMg"]', '0.08');
      await page.fill('form [name="minWeightSafetyFactor"]', '2');
      await page.fill('form [name="calibratedOn"]', '2026-10-01');
      await page.fill('form [name="calibrationDueOn"]', '2027-10-01');
      await page.click('[data-testid="record-form-submit"]');
      await page.waitForSelector('#identifier-error');
      expect(await page.getAttribute('#identifier', 'aria-invalid')).toBe('true');
      const conflict = problems.findIndex((p) => /status of 409/.test(p) && /\/api\/balances\b/.test(p));
      expect(conflict).toBeGreaterThanOrEqual(0); // provoked on purpose, see above
      problems.splice(conflict, 1);

      // Balances list and one balance's minimum weight with its basis.
      await page.goto(`${server.baseUrl}/inventory/balances`);
      await settled(page);
      const balances = await apiGet<{ items: { id: number; identifier: string; minWeightMg: string | null }[] }>(page, '/api/balances?sort=identifier&dir=asc');
      expect(await rowNames(page)).toEqual(balances.items.map((b) => b.identifier));
      await screenshot(page, 'e2e-inventory-balances-desktop', false);
      const withMin = balances.items.find((b) => b.minWeightMg !== null)!;
      await page.goto(`${server.baseUrl}/inventory/balances/${withMin.id}`);
      await page.waitForSelector('[data-testid="min-weight"]');
      expect(await page.textContent('[data-testid="min-weight-value"]')).toBe(withMin.minWeightMg);
      expect(await page.textContent('[data-testid="min-weight-basis"]')).toContain('USP <41>: m_min = 2000·max(s, 0.41 d) × SF');
      // USP <41> (METROLOGY §7) on the seeded BAL-A1: s = 0.08 mg > 0.41 × 0.1 mg, so 2000 × 0.08 = 160 mg (the demo lab's SF is 1).
      expect(withMin.identifier).toBe('BAL-A1');
      expect(await page.textContent('[data-testid="min-weight-redo"]')).toContain('= 160 mg');
      expect(withMin.minWeightMg).toBe('160');
      await page.setViewportSize(TABLET);
      await noPageOverflow(page);
      await screenshot(page, 'e2e-inventory-balance-detail-tablet');

      // Volumetric ware filtered by kind, from the address bar.
      await page.goto(`${server.baseUrl}/inventory/volumetric-ware?kind=piston_pipette`);
      await settled(page);
      const pipettes = await apiGet<{ items: { identifier: string }[] }>(page, '/api/volumetric-ware?kind=piston_pipette&sort=identifier&dir=asc');
      expect(pipettes.items.length).toBeGreaterThan(0);
      expect(await rowNames(page)).toEqual(pipettes.items.map((w) => w.identifier));
      expect(await page.inputValue('#kind')).toBe('piston_pipette');
      await noPageOverflow(page);
      await screenshot(page, 'e2e-inventory-ware-tablet', false);

      expect(problems).toEqual([]);
    } catch (e) {
      await screenshot(page, 'e2e-inventory-failure-chemist');
      throw new Error(`${(e as Error).message}\nproblems: ${problems.join('\n')}`);
    } finally {
      await context.close();
    }
  });

  it('when a technician opens the inventory, then every record is readable and no edit control is shown', async () => {
    const { page, problems, context } = await openPage(browser, TABLET);
    try {
      await signIn(page, server.baseUrl, 'technician@harbourside.example', PASSWORD);
      await page.click('[data-testid="menu-button"]');
      await page.click('#mobile-menu [data-testid="nav-inventory-materials"]');
      await page.waitForSelector('[data-testid="inventory-list-materials"]');
      await settled(page);
      expect(await page.locator('[data-testid="inventory-row"]').count()).toBeGreaterThan(0);
      expect(await page.locator('[data-testid="create-link"]').count()).toBe(0);

      const lead = (await apiGet<Page_>(page, '/api/materials?search=Lead')).items[0];
      await page.goto(`${server.baseUrl}/inventory/materials/${lead.id}`);
      await page.waitForSelector('[data-testid="certificate-row"]'); // the chemist's version 1 is readable
      expect(await page.textContent('[data-testid="certificate-version"]')).toBe('1');
      expect(await page.locator('[data-testid="edit-button"]').count()).toBe(0);
      expect(await page.locator('[data-testid="retire-button"]').count()).toBe(0);
      expect(await page.locator('[data-testid="certificate-upload"]').count()).toBe(0);
      await noPageOverflow(page);
      await screenshot(page, 'e2e-inventory-technician-tablet');

      // The create page is not for this role, and the server refuses the write anyway.
      await page.goto(`${server.baseUrl}/inventory/materials/new`);
      await page.waitForSelector('[data-testid="not-allowed"]');
      const res = await page.request.patch(`${server.baseUrl}/api/materials/${lead.id}`, { data: { storage: 'changed' } });
      expect(res.status()).toBe(403);

      expect(problems).toEqual([]);
    } finally {
      await context.close();
    }
  });
});
