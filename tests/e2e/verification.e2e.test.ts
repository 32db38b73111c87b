/**
 * Signatures and second-person verification through a real browser (REQUIREMENTS ES-01…ES-08, RV-01…RV-03):
 * the demo chemist makes a complete Pb standard (plan → weigh → make up through the API with the page's own
 * cookies), signs it "prepared" with the password (a wrong password first: refused at the field); the admin
 * finds the "verification requested" e-mail in the Outbox; the preparer cannot verify their own record (the
 * button is disabled with the reason, and the API answers 403 self_verification when called directly); the
 * second demo chemist opens the record from the e-mail's link, sees "Sign as verified" disabled until every
 * checklist item is ticked, and verifies with the password; the record then shows both signatures with
 * names, times (lab zone and UTC), meanings and versions.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { D } from '../../shared/calc/decimal.ts';
import { SIGNATURE_MEANING_TEXT, VERIFICATION_CHECKLIST } from '../../shared/schemas/preparations.ts';
import { launchBrowser, openPage, screenshot, signIn, startServer, type RunningServer, type WatchedPage } from './harness.ts';

const PASSWORD = 'bench-demo-2026'; // the seeded demo lab's shared demo password (README)
const CHEMIST = 'chemist@harbourside.example'; // Dr. Maren Tollefsen (seed/demo-data.ts)
const CHEMIST2 = 'chemist2@harbourside.example'; // Idris Okonkwo-Baptiste
const ADMIN = 'admin@harbourside.example';
const TABLET = { width: 820, height: 1180 };
const DESKTOP = { width: 1280, height: 800 };

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

const text = async (page: Page, id: string) => ((await page.textContent(`[data-testid="${id}"]`)) ?? '').trim();

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

/**
 * Chromium logs each 4xx fetch as a console error; these are the ones the test provokes on purpose: the wrong
 * password (401) and the preparer's direct verification call (403).
 */
function unexpected(problems: string[]): string[] {
  return problems.filter((p) => !/status of (401|403) .*\/api\/preparations\/[^/]+\/signatures\)$/.test(p));
}

/** A complete (weighed and made up) Pb standard, planned by the signed-in chemist; returns its identifier. */
async function makeCompletePreparation(page: Page): Promise<string> {
  const materials = await call(page, 'GET', '/api/materials?usable=1&pageSize=200');
  const pb = materials.body.items.find((m: any) => m.formula === 'Pb(NO3)2' && m.status === 'accepted');
  const balances = await call(page, 'GET', '/api/balances?usable=1');
  const bal = balances.body.items.find((b: any) => b.identifier === 'BAL-SM1');
  const ware = await call(page, 'GET', '/api/volumetric-ware?kind=volumetric_flask&usable=1');
  const flask = ware.body.items.find((w: any) => w.status === 'in_service' && new D(w.nominalVolumeMl).eq(100) && !w.holds); // a flask holding no open solution
  const solvents = await call(page, 'GET', '/api/solvents');
  const water = solvents.body.items.find((s: any) => s.name === 'Ultrapure water');
  expect(pb && bal && flask && water, 'demo lab has Pb(NO3)2, BAL-SM1, a 100 mL flask and ultrapure water').toBeTruthy();

  const conditions = { source: 'measured', temperatureC: '21.0', pressureHPa: '1009', relativeHumidityPct: '45' };
  const planned = await call(page, 'POST', '/api/preparations', {
    materialId: pb.id,
    analyteFormula: 'Pb',
    target: { value: '1000', unit: 'mg/L' },
    flaskId: flask.id,
    balanceId: bal.id,
    conditions,
  });
  expect(planned.status, JSON.stringify(planned.body)).toBe(201);
  const id: string = planned.body.identifier;
  // The reading to aim for, typed with the balance's two decimals (d = 0.01 mg): inside the window by construction.
  const reading = new D(planned.body.plan.targetReading.value).toFixed(2);
  const weighed = await call(page, 'POST', `/api/preparations/${id}/weighings`, { mode: 'direct', reading, unit: 'mg', conditions });
  expect(weighed.status, JSON.stringify(weighed.body)).toBe(201);
  const madeUp = await call(page, 'POST', `/api/preparations/${id}/make-up`, {
    flaskIdentifier: flask.identifier,
    solventId: water.id,
    solventLot: water.lot,
    solutionTemperatureC: '20.5',
    applyTemperatureCorrection: false,
  });
  expect(madeUp.status, JSON.stringify(madeUp.body)).toBe(201);
  expect(madeUp.body.stage).toBe('complete');
  expect(madeUp.body.status).toBe('planned');
  return id;
}

/** Fills the signing dialog: acknowledgement when asked (first signature), then the password. */
async function signInDialog(page: Page, password: string) {
  await page.waitForSelector('[data-testid="signature-dialog"][open]');
  if (await page.isVisible('[data-testid="signature-acknowledge"]')) {
    if (!(await page.isChecked('[data-testid="signature-acknowledge"]'))) await page.check('[data-testid="signature-acknowledge"]');
  }
  await page.fill('[data-testid="signature-password"]', password);
  await page.click('[data-testid="signature-submit"]');
}

describe('signatures and second-person verification', () => {
  it('when the preparer signs and a second chemist verifies, then the record shows both signatures, and the preparer cannot verify their own', async () => {
    // ---------------------------------------------------------------- preparer: Maren
    const maren = await openPage(browser, DESKTOP);
    pages.push(maren);
    const mp = maren.page;
    await signIn(mp, server.baseUrl, CHEMIST, PASSWORD);
    const identifier = await makeCompletePreparation(mp);

    await mp.goto(`${server.baseUrl}/preparations/${identifier}`);
    await mp.waitForSelector('[data-testid="detail-identifier"]');
    expect(await text(mp, 'detail-status')).toContain('Planned'); // words, not colour alone
    expect(await text(mp, 'no-signatures')).toMatch(/Not signed yet/);
    await mp.click('[data-testid="sign-prepared"]');
    await mp.waitForSelector('[data-testid="signature-dialog"][open]');
    // The meaning is shown before signing (ES-02), with the signer: the signed-in user only (ES-06).
    expect(await text(mp, 'signature-meaning-text')).toBe(SIGNATURE_MEANING_TEXT.prepared);
    expect(await text(mp, 'signature-signer')).toBe('Dr. Maren Tollefsen');
    expect(await mp.getAttribute('[data-testid="signature-password"]', 'autocomplete')).toBe('current-password');
    expect(await mp.getAttribute('[data-testid="signature-password"]', 'type')).toBe('password');
    // The demo seed has Maren sign earlier records, so the first-signing statement is not asked again (ES-08;
    // a new chemist's first signature is checked at the end).
    expect(await mp.isVisible('[data-testid="signature-responsibility"]')).toBe(false);
    await screenshot(mp, 'verify-sign-prepared-dialog-1280', false);

    // A wrong password is refused at the password field (401 signature_password), the record stays unsigned.
    await mp.fill('[data-testid="signature-password"]', 'not-my-password');
    await mp.click('[data-testid="signature-submit"]');
    await mp.waitForSelector('[data-testid="signature-password-error"]');
    expect(await text(mp, 'signature-password-error')).toMatch(/password is not correct/i);
    expect(await mp.inputValue('[data-testid="signature-password"]')).toBe(''); // cleared, never kept
    const stillPlanned = await call(mp, 'GET', `/api/preparations/${identifier}`);
    expect(stillPlanned.body.status).toBe('planned');
    expect(stillPlanned.body.signatures).toHaveLength(0);

    await signInDialog(mp, PASSWORD);
    await mp.waitForSelector('[data-testid="sign-done"]');
    await mp.waitForSelector('[data-testid="signature-dialog"]', { state: 'detached' });
    expect(await text(mp, 'detail-status')).toContain('Prepared');
    expect(await mp.locator('[data-testid="signature-entry"]').count()).toBe(1);
    expect(await text(mp, 'signature-meaning')).toBe('Prepared by');
    expect(await text(mp, 'signature-name')).toBe('Dr. Maren Tollefsen');

    // The preparer cannot verify: the way to the verification page is disabled with the server's reason …
    await mp.waitForSelector('[data-testid="open-verify"][disabled]');
    expect(await text(mp, 'open-verify-reason')).toMatch(/second chemist must review it/);
    await screenshot(mp, 'verify-preparer-signed-1280');
    // … the verification page itself keeps "Sign as verified" disabled with the reason, even with every item ticked …
    await mp.goto(`${server.baseUrl}/preparations/${identifier}/verify`);
    await mp.waitForSelector('[data-testid="verification-panel"]');
    expect(await mp.isDisabled('[data-testid="sign-verified"]')).toBe(true);
    expect(await text(mp, 'sign-verified-reason')).toMatch(/you signed this version as prepared/);
    expect(await mp.isDisabled('[data-testid="sign-returned"]')).toBe(true);
    // … and the server refuses a direct call, whatever the client does (RV-02).
    const checklist = Object.fromEntries(VERIFICATION_CHECKLIST.map((c) => [c.key, true]));
    const selfVerify = await call(mp, 'POST', `/api/preparations/${identifier}/signatures`, { meaning: 'verified', password: PASSWORD, checklist });
    expect(selfVerify.status).toBe(403);
    expect(selfVerify.body.error.code).toBe('self_verification');

    // ---------------------------------------------------------------- admin: the Outbox
    const admin = await openPage(browser, DESKTOP);
    pages.push(admin);
    const ap = admin.page;
    await signIn(ap, server.baseUrl, ADMIN, PASSWORD);
    await ap.click('[data-testid="nav-outbox"]');
    await ap.waitForSelector('[data-testid="outbox-count"]');
    const subject = `Verification requested: ${identifier}`;
    // Delivery to the local mail catcher happens after the commit: refresh until it is there.
    await expect
      .poll(
        async () => {
          await ap.click('[data-testid="outbox-refresh"]');
          await ap.waitForSelector('[data-testid="outbox-refresh"]:not([aria-busy])');
          return ap.$$eval('[data-testid="outbox-row-subject"]', (els) => els.map((e) => e.textContent?.trim()));
        },
        { timeout: 20_000, interval: 500 },
      )
      .toContain(subject);
    const row = ap.locator('[data-testid="outbox-row"]', { hasText: subject }).filter({ hasText: CHEMIST2 });
    expect(await row.count()).toBe(1); // to the other active chemist, not the preparer
    expect(await ap.locator('[data-testid="outbox-row"]', { hasText: subject }).filter({ hasText: CHEMIST }).count()).toBe(0);
    await row.click();
    await ap.waitForSelector('[data-testid="outbox-message"]');
    expect(await text(ap, 'outbox-message-subject')).toBe(subject);
    const mailText = await text(ap, 'outbox-text');
    // the link to the record, on this server (PUBLIC_URL unset: the listening address)
    const port = new URL(server.baseUrl).port;
    expect(mailText).toMatch(new RegExp(`http://(127\\.0\\.0\\.1|localhost):${port}/preparations/${identifier}(\\s|$)`));
    // The HTML part is rendered in a sandboxed frame without scripts.
    expect(await ap.getAttribute('[data-testid="outbox-html"]', 'sandbox')).toBe('');
    const frame = ap.frameLocator('[data-testid="outbox-html"]');
    await expect.poll(async () => (await frame.locator('body').textContent()) ?? '').toContain(identifier);
    await screenshot(ap, 'verify-outbox-1280', false);
    await ap.setViewportSize(TABLET);
    await screenshot(ap, 'verify-outbox-820');

    // ---------------------------------------------------------------- verifier: Idris, on a tablet
    const idris = await openPage(browser, TABLET);
    pages.push(idris);
    const ip = idris.page;
    await signIn(ip, server.baseUrl, CHEMIST2, PASSWORD);
    await ip.goto(`${server.baseUrl}/preparations/${identifier}`); // the e-mail's link
    await ip.waitForSelector('[data-testid="open-verify"]:not([disabled])');
    await ip.click('[data-testid="open-verify"]');
    await ip.waitForURL(new RegExp(`/preparations/${identifier}/verify$`));
    await ip.waitForSelector('[data-testid="verification-panel"]');
    expect(await ip.isVisible('[data-testid="weighing-list"]')).toBe(true); // the whole record is on the page
    expect(await ip.isVisible('[data-testid="signature-list"]')).toBe(true);

    // Every checklist item must be ticked before "Sign as verified" enables (RV-03).
    const boxes = ip.locator('[data-testid="verification-panel"] input[type="checkbox"]');
    expect(await boxes.count()).toBe(VERIFICATION_CHECKLIST.length);
    expect(await ip.isDisabled('[data-testid="sign-verified"]')).toBe(true);
    for (let i = 0; i < VERIFICATION_CHECKLIST.length - 1; i += 1) await boxes.nth(i).check();
    expect(await ip.isDisabled('[data-testid="sign-verified"]')).toBe(true); // one item left
    expect(await text(ip, 'sign-verified-reason')).toMatch(/1 left/);
    await ip.locator('#detail-verification-title').scrollIntoViewIfNeeded();
    await screenshot(ip, 'verify-checklist-820', false);
    await boxes.nth(VERIFICATION_CHECKLIST.length - 1).check();
    expect(await ip.isDisabled('[data-testid="sign-verified"]')).toBe(false);
    // 48 px touch targets for the tablet: the sign button and every checklist row.
    const signBox = await ip.locator('[data-testid="sign-verified"]').boundingBox();
    expect(signBox!.height).toBeGreaterThanOrEqual(48);
    const rowHeights = await ip.$$eval('[data-testid="verification-panel"] label', (els) => els.map((e) => e.getBoundingClientRect().height));
    expect(Math.min(...rowHeights)).toBeGreaterThanOrEqual(48);

    await ip.click('[data-testid="sign-verified"]');
    await ip.waitForSelector('[data-testid="signature-dialog"][open]');
    expect(await text(ip, 'signature-meaning-text')).toBe(SIGNATURE_MEANING_TEXT.verified);
    expect(await text(ip, 'signature-signer')).toBe('Idris Okonkwo-Baptiste');
    await screenshot(ip, 'verify-sign-verified-dialog-820', false);
    await signInDialog(ip, PASSWORD);
    await ip.waitForURL(new RegExp(`/preparations/${identifier}$`));
    await ip.waitForSelector('[data-testid="sign-done"]');
    expect(await text(ip, 'detail-status')).toContain('Verified');
    // the confirmation is where the verifier is looking, not above the fold they scrolled past
    await ip.waitForFunction(() => {
      const r = document.querySelector('[data-testid="sign-done"]')!.getBoundingClientRect();
      return r.top >= 0 && r.bottom <= window.innerHeight;
    });

    // Both signatures, oldest first, with printed names, meanings, versions and times in the lab zone and in UTC (ES-01).
    const after = await call(ip, 'GET', `/api/preparations/${identifier}`);
    expect(after.body.status).toBe('verified');
    const entries = ip.locator('[data-testid="signature-entry"]');
    expect(await entries.count()).toBe(2);
    const shown = await entries.evaluateAll((els) =>
      els.map((e) => ({
        meaning: e.querySelector('[data-testid="signature-meaning"]')?.textContent?.trim(),
        name: e.querySelector('[data-testid="signature-name"]')?.textContent?.trim(),
        time: e.querySelector('[data-testid="signature-time"]')?.textContent?.trim(),
        utc: e.querySelector('[data-testid="signature-utc"]')?.textContent?.trim(),
        version: e.querySelector('[data-testid="signature-version-tag"]')?.textContent?.trim(),
        valid: e.getAttribute('data-valid'),
      })),
    );
    expect(shown.map((s) => [s.meaning, s.name])).toEqual([
      ['Prepared by', 'Dr. Maren Tollefsen'],
      ['Verified by', 'Idris Okonkwo-Baptiste'],
    ]);
    after.body.signatures.forEach((sig: any, i: number) => {
      const s = shown[i]!;
      // UTC as stored, to the second (the server's ISO timestamp)
      expect(s.utc).toBe(`${sig.signedAt.slice(0, 10)} ${sig.signedAt.slice(11, 19)} UTC`);
      // the lab zone (seed settings: Europe/London) is named beside the local time
      expect(s.time).toMatch(/\d{2}:\d{2}:\d{2} (GMT|BST|UTC)[^()]*\(Europe\/London\)$/);
      expect(s.version).toBe(`v ${sig.recordVersion}`);
      expect(s.valid).toBe('true');
    });
    await screenshot(ip, 'verify-verified-820');
    await ip.evaluate(() => window.scrollTo(0, 0));
    await screenshot(ip, 'verify-verified-top-820', false);
    await ip.locator('#detail-signatures-title').scrollIntoViewIfNeeded();
    await screenshot(ip, 'verify-signatures-820', false);
    await ip.setViewportSize(DESKTOP);
    await ip.locator('#detail-signatures-title').scrollIntoViewIfNeeded();
    await screenshot(ip, 'verify-signatures-1280', false);

    // The preparer is told by e-mail.
    await ap.click('[data-testid="outbox-refresh"]');
    await expect
      .poll(
        async () => {
          await ap.click('[data-testid="outbox-refresh"]');
          return ap.locator('[data-testid="outbox-row"]', { hasText: `Verified: ${identifier}` }).filter({ hasText: CHEMIST }).count();
        },
        { timeout: 20_000, interval: 500 },
      )
      .toBe(1);

    // The list shows the status in words.
    await mp.goto(`${server.baseUrl}/preparations?tab=all&search=${identifier}`);
    await mp.waitForSelector('[data-testid="prep-row-status"]');
    expect(await text(mp, 'prep-row-status')).toContain('Verified');

    // ---------------------------------------------------------------- a correction after signing (ES-03, CO-02)
    await mp.goto(`${server.baseUrl}/preparations/${identifier}/bench`);
    await mp.waitForSelector('[data-testid="weighing-entry"]');
    expect(await text(mp, 'bench-status')).toContain('Verified');
    const wid = (await mp.getAttribute('[data-testid^="correct-weighing-"]', 'data-testid'))!.replace('correct-weighing-', '');
    await mp.click(`[data-testid="correct-weighing-${wid}"]`);
    await mp.waitForSelector('[data-testid="change-signature"]');
    expect(await text(mp, 'change-signature')).toMatch(/signed as prepared and then verified again/);
    const corrected = new D(after.body.weighings[0].reading.value).minus('0.02').toFixed(2);
    await mp.fill('[data-testid="input-reading"]', corrected);
    await mp.fill('[data-testid="correction-reason"]', 'Reading transcribed from the wrong line of the balance log');
    await mp.click('[data-testid="save-weighing"]'); // no password → asked for at the field, nothing sent
    await mp.waitForSelector('[data-testid="change-signature-error"]');
    await screenshot(mp, 'verify-amend-bench-1280', false);
    await mp.fill('[data-testid="change-signature-password"]', PASSWORD);
    await mp.click('[data-testid="save-weighing"]');
    await mp.waitForSelector('[data-testid="weighing-superseded"]');
    await mp.waitForSelector('[data-testid="bench-amended"]');
    expect(await text(mp, 'bench-status')).toContain('Planned'); // back to planned: sign and verify again
    await mp.click('[data-testid="bench-to-detail"]');
    await mp.waitForSelector('[data-testid="signature-list"]');
    const amended = await call(mp, 'GET', `/api/preparations/${identifier}`);
    expect(amended.body.version).toBe(after.body.version + 1);
    expect(await text(mp, 'amended-marker')).toBe(`Amended from v ${after.body.version} · now v ${amended.body.version}`);
    // the two earlier signatures stay listed against the version they signed; the amendment applies to the new one
    const superseded = await mp.$$eval('[data-testid="signature-superseded"]', (els) => els.map((e) => e.textContent?.trim()));
    expect(superseded).toEqual([`superseded: applied to v ${after.body.version}`, `superseded: applied to v ${after.body.version}`]);
    expect(await mp.locator('[data-testid="signature-entry"][data-meaning="amended"][data-valid="true"]').count()).toBe(1);
    await mp.locator('#detail-signatures-title').scrollIntoViewIfNeeded();
    await screenshot(mp, 'verify-amended-signatures-1280', false);

    // ---------------------------------------------------------------- return to the preparer with a reason (RV-06)
    const second = await makeCompletePreparation(mp);
    const signed2 = await call(mp, 'POST', `/api/preparations/${second}/signatures`, { meaning: 'prepared', password: PASSWORD });
    expect(signed2.status, JSON.stringify(signed2.body)).toBe(201);
    await ip.goto(`${server.baseUrl}/preparations/${second}/verify`);
    await ip.waitForSelector('[data-testid="verification-panel"]');
    await ip.click('[data-testid="sign-returned"]');
    await ip.waitForSelector('[data-testid="signature-dialog"][open]');
    expect(await text(ip, 'signature-meaning-text')).toBe(SIGNATURE_MEANING_TEXT.returned);
    await ip.fill('[data-testid="signature-password"]', PASSWORD);
    await ip.click('[data-testid="signature-submit"]'); // the reason is required
    await ip.waitForSelector('[data-testid="signature-reason"][aria-invalid="true"]');
    await ip.fill('[data-testid="signature-reason"]', 'Solution temperature not recorded on the flask log; add it before signing again');
    await ip.click('[data-testid="signature-submit"]');
    await ip.waitForURL(new RegExp(`/preparations/${second}$`));
    await ip.waitForSelector('[data-testid="status-reason"]');
    expect(await text(ip, 'detail-status')).toContain('Returned');
    expect(await text(ip, 'status-reason')).toMatch(/Returned to the preparer by Idris Okonkwo-Baptiste.*flask log/);
    await mp.goto(`${server.baseUrl}/preparations/${second}`);
    await mp.waitForSelector('[data-testid="status-reason"]');
    await screenshot(mp, 'verify-returned-1280', false);

    // ---------------------------------------------------------------- a new chemist's first signature (ES-08)
    const created = await call(ap, 'POST', '/api/users', {
      email: 'saoirse.brannigan@harbourside.example',
      fullName: 'Saoirse Brannigan-Hale',
      initials: 'SBH',
      role: 'chemist',
      password: 'set-by-the-admin-2026', // temporary: she chooses her own at first sign-in
    });
    expect(created.status, JSON.stringify(created.body)).toBe(201);
    const saoirse = await openPage(browser, TABLET);
    pages.push(saoirse);
    const sp = saoirse.page;
    await sp.goto(`${server.baseUrl}/sign-in`);
    await sp.fill('input[name="email"]', 'saoirse.brannigan@harbourside.example');
    await sp.fill('input[name="password"]', 'set-by-the-admin-2026');
    await sp.click('[data-testid="sign-in-submit"]');
    await sp.waitForSelector('[data-testid="forced-password-explainer"]');
    await sp.fill('input[name="currentPassword"]', 'set-by-the-admin-2026');
    await sp.fill('input[name="newPassword"]', 'first-sign-2026');
    await sp.fill('input[name="confirmPassword"]', 'first-sign-2026');
    await sp.click('[data-testid="change-password-submit"]');
    await sp.waitForSelector('[data-testid="home-role"]');
    // Discard the demo nitrate standard (planned only in the seed): a reason and the statement are required.
    const list = await call(sp, 'GET', '/api/preparations?search=NO3&page=1&pageSize=25');
    const nitrate = list.body.items.find((p: any) => p.analyteFormula === 'NO3' && p.status === 'planned');
    expect(nitrate, 'the demo lab has a planned nitrate standard').toBeTruthy();
    await sp.goto(`${server.baseUrl}/preparations/${nitrate.identifier}`);
    await sp.click('[data-testid="sign-discarded"]');
    await sp.waitForSelector('[data-testid="signature-dialog"][open]');
    expect(await text(sp, 'signature-meaning-text')).toBe(SIGNATURE_MEANING_TEXT.discarded);
    await sp.waitForSelector('[data-testid="signature-responsibility"]'); // the server says this is her first signature
    expect(await text(sp, 'signature-responsibility')).toMatch(/legally binding equivalent of my handwritten signature/);
    await sp.fill('[data-testid="signature-password"]', 'first-sign-2026');
    await sp.click('[data-testid="signature-submit"]'); // no reason, no tick → refused in the dialog, nothing sent
    await sp.waitForSelector('[data-testid="signature-responsibility"] [role="alert"]');
    await sp.waitForSelector('[data-testid="signature-reason"][aria-invalid="true"]');
    await screenshot(sp, 'verify-first-signature-820', false);
    await sp.fill('[data-testid="signature-reason"]', 'Nitrate stock no longer needed: method moved to ion chromatography kit standards');
    await sp.check('[data-testid="signature-acknowledge"]');
    await sp.click('[data-testid="signature-submit"]');
    await sp.waitForSelector('[data-testid="sign-done"]');
    expect(await text(sp, 'detail-status')).toContain('Discarded');
    expect(await text(sp, 'signature-meaning')).toBe('Discarded by');
    expect(await text(sp, 'signature-reason-text')).toMatch(/no longer needed/);

    expect(unexpected(saoirse.problems)).toEqual([]);
    expect(unexpected(maren.problems)).toEqual([]);
    expect(unexpected(admin.problems)).toEqual([]);
    expect(unexpected(idris.problems)).toEqual([]);
  });
});
