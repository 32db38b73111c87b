/**
 * Accounts and sessions in a real browser (issue 10 §2, §3): a password an administrator set is temporary
 * (the forced change page, every API refused with 403 password_change_required until done); "Change password";
 * "Active sessions" for QA and admin, an administrator ends a session; "Sign out everywhere" ends them all.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { launchBrowser, openPage, screenshot, signIn, startServer, type RunningServer, type WatchedPage } from './harness.ts';

const PASSWORD = 'bench-demo-2026'; // the seeded demo lab's shared demo password (README)

let server: RunningServer;
let browser: Browser;
const pages: WatchedPage[] = [];

beforeAll(async () => {
  server = await startServer();
  browser = await launchBrowser();
});

afterAll(async () => {
  for (const p of pages) await p.context.close();
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

async function open(): Promise<Page> {
  const w = await openPage(browser);
  pages.push(w);
  return w.page;
}

describe('accounts and sessions', () => {
  it('when an admin-created account signs in, then only the forced change page shows until it chooses its own password', async () => {
    const admin = await open();
    await signIn(admin, server.baseUrl, 'admin@harbourside.example', PASSWORD);
    const created = await call(admin, 'POST', '/api/users', {
      email: 'odile.farrant@harbourside.example',
      fullName: 'Odile Farrant',
      initials: 'OF',
      role: 'technician',
      password: 'set-by-the-admin-2026',
    });
    expect(created.status, JSON.stringify(created.body)).toBe(201);

    const p = await open();
    await p.goto(`${server.baseUrl}/sign-in`);
    await p.fill('input[name="email"]', 'odile.farrant@harbourside.example');
    await p.fill('input[name="password"]', 'set-by-the-admin-2026');
    await p.click('[data-testid="sign-in-submit"]');
    await p.waitForSelector('[data-testid="forced-password-explainer"]');
    expect(await p.locator('[data-testid="nav-home"]').count()).toBe(0);
    const refused = await call(p, 'GET', '/api/materials');
    expect(refused.status).toBe(403);
    expect(refused.body.error.code).toBe('password_change_required');
    // another address in the app shows the same page
    await p.goto(`${server.baseUrl}/inventory/materials`);
    await p.waitForSelector('[data-testid="forced-password-explainer"]');
    // a password with her name in it is refused at the field
    await p.fill('input[name="currentPassword"]', 'set-by-the-admin-2026');
    await p.fill('input[name="newPassword"]', 'farrant-weighs-2026');
    await p.fill('input[name="confirmPassword"]', 'farrant-weighs-2026');
    await p.click('[data-testid="change-password-submit"]');
    await p.waitForSelector('#newPassword-error');
    expect(await p.textContent('#newPassword-error')).toMatch(/e-mail address or name/);
    await screenshot(p, 'accounts-forced-change-1280', false);
    await p.fill('input[name="newPassword"]', 'copper-tide-lantern');
    await p.fill('input[name="confirmPassword"]', 'copper-tide-lantern');
    await p.click('[data-testid="change-password-submit"]');
    await p.waitForSelector('[data-testid="nav-home"]'); // the page she asked for, in the app shell
    expect((await call(p, 'GET', '/api/materials')).status).toBe(200);
  });

  it('when QA opens Active sessions, then the signed-in people are listed; an admin ends one and that browser is signed out', async () => {
    const chemist = await open();
    await signIn(chemist, server.baseUrl, 'chemist@harbourside.example', PASSWORD);
    const qa = await open();
    await signIn(qa, server.baseUrl, 'qa@harbourside.example', PASSWORD);
    await qa.click('[data-testid="nav-sessions"]');
    await qa.waitForSelector('[data-testid="sessions-table"]');
    expect(await qa.textContent('[data-testid="sessions-table"]')).toContain('Dr. Maren Tollefsen');
    expect(await qa.locator('[data-testid="end-session"]').count()).toBe(0); // QA sees, does not end
    await screenshot(qa, 'accounts-sessions-qa-1280', false);

    const admin = await open();
    await signIn(admin, server.baseUrl, 'admin@harbourside.example', PASSWORD);
    await admin.goto(`${server.baseUrl}/sessions`);
    await admin.waitForSelector('[data-testid="sessions-table"]');
    admin.on('dialog', (d) => void d.accept());
    const before = await admin.locator('[data-testid="session-row"]').count();
    await admin.locator('[data-testid="session-row"]', { hasText: 'Dr. Maren Tollefsen' }).first().locator('[data-testid="end-session"]').click();
    await admin.waitForFunction((n) => document.querySelectorAll('[data-testid="session-row"]').length === n - 1, before);
    const after = await call(chemist, 'GET', '/api/auth/me');
    expect(after.status).toBe(401);
  });

  it('when someone changes their own password and then signs out everywhere, then every other browser of theirs is signed out', async () => {
    const tablet = await open();
    await signIn(tablet, server.baseUrl, 'chemist2@harbourside.example', PASSWORD);
    const desk = await open();
    await signIn(desk, server.baseUrl, 'chemist2@harbourside.example', PASSWORD);
    await desk.click('[data-testid="nav-change-password"]');
    await desk.fill('input[name="currentPassword"]', PASSWORD);
    await desk.fill('input[name="newPassword"]', 'quiet-harbour-sextant');
    await desk.fill('input[name="confirmPassword"]', 'quiet-harbour-sextant');
    await desk.click('[data-testid="change-password-submit"]');
    await desk.waitForSelector('[data-testid="change-password-done"]');
    expect((await call(tablet, 'GET', '/api/auth/me')).status).toBe(401); // the change ended the other session
    expect((await call(desk, 'GET', '/api/auth/me')).status).toBe(200);
    const again = await open();
    await signIn(again, server.baseUrl, 'chemist2@harbourside.example', 'quiet-harbour-sextant');
    desk.on('dialog', (d) => void d.accept());
    await desk.click('[data-testid="sign-out-everywhere"]');
    await desk.waitForURL(/\/sign-in/);
    expect((await call(again, 'GET', '/api/auth/me')).status).toBe(401);
    expect((await call(desk, 'GET', '/api/auth/me')).status).toBe(401);
  });
});
