/**
 * The home page's work lists in a real browser at tablet size (issue 16 §5), on the seeded demo lab
 * (seed/demo-preparations.ts): the TOC stock signed "prepared" by the first chemist awaits the second chemist's
 * verification and not its preparer's (REQUIREMENTS RV-02); the Cu stock (weighed, not made up) and the nitrate
 * stock (planned only) are to weigh or make up, the chemist's own plan first; a technician sees what to weigh but
 * no verification list; QA sees only what expires. Each row opens the page where the work is done.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser, Page } from 'playwright-core';
import { launchBrowser, openPage, screenshot, signIn, startServer, type RunningServer, type WatchedPage } from './harness.ts';

const PASSWORD = 'bench-demo-2026'; // the seeded demo lab's shared demo password (README)
const CHEMIST = 'chemist@harbourside.example'; // Dr. Maren Tollefsen (seed/demo-data.ts)
const CHEMIST2 = 'chemist2@harbourside.example'; // Idris Okonkwo-Baptiste
const TECHNICIAN = 'technician@harbourside.example';
const QA = 'qa@harbourside.example';
const TABLET = { width: 820, height: 1180 };

let server: RunningServer;
let browser: Browser;
const pages: WatchedPage[] = [];
const id: Record<string, string> = {};

beforeAll(async () => {
  server = await startServer();
  browser = await launchBrowser();
});

afterAll(async () => {
  for (const p of pages) await p.context.close().catch(() => undefined);
  await browser?.close();
  await server?.stop();
});

async function signedIn(email: string): Promise<Page> {
  const w = await openPage(browser, TABLET);
  pages.push(w);
  await signIn(w.page, server.baseUrl, email, PASSWORD);
  await w.page.waitForSelector('[data-testid="work-lists"]');
  return w.page;
}

const rows = async (page: Page, list: string) =>
  page.$$eval(`[data-testid="worklist-${list}"] [data-testid^="work-item-"]`, (els) => els.map((e) => e.getAttribute('data-testid')!.replace('work-item-', '')));

describe('work lists on the home page', () => {
  it('shows each user what waits for them, and each row opens where the work is done', async () => {
    const maren = await signedIn(CHEMIST);
    const all = await maren.evaluate(async () => (await (await fetch('/api/preparations?pageSize=100')).json()).items as Array<{ identifier: string; analyteFormula: string }>);
    for (const f of ['C', 'Cu', 'NO3']) id[f] = all.find((p) => p.analyteFormula === f)!.identifier;

    // the preparer: nothing to verify (she signed the TOC record herself); her nitrate plan first, then Cu
    await maren.waitForSelector('[data-testid="worklist-awaitingVerification"]');
    expect(await rows(maren, 'awaitingVerification')).toEqual([]);
    expect(await maren.textContent('[data-testid="worklist-awaitingVerification"]')).toContain('Nothing waits for your verification');
    expect(await rows(maren, 'toWeighOrMakeUp')).toEqual([id.NO3, id.Cu]);
    const cuRow = (await maren.textContent(`[data-testid="work-item-${id.Cu}"]`)) ?? '';
    expect(cuRow).toContain('Make up to the mark');
    expect(cuRow).toContain('Idris Okonkwo-Baptiste');
    expect(await maren.textContent(`[data-testid="work-item-${id.NO3}"]`)).toContain('planned by you');
    expect(await maren.isVisible('[data-testid="worklist-expiringSoon"]')).toBe(true);
    await screenshot(maren, 'worklists-chemist-820');
    await maren.click(`[data-testid="work-item-${id.NO3}"]`);
    await maren.waitForURL(`**/preparations/${id.NO3}/bench`);

    // the second chemist: the TOC record awaits her verification; the row opens the verification page
    const idris = await signedIn(CHEMIST2);
    expect(await rows(idris, 'awaitingVerification')).toEqual([id.C]);
    expect(await idris.textContent(`[data-testid="work-item-${id.C}"]`)).toContain('Verify');
    await idris.click(`[data-testid="work-item-${id.C}"]`);
    await idris.waitForURL(`**/preparations/${id.C}/verify`);

    // the technician weighs and makes up but does not verify
    const priya = await signedIn(TECHNICIAN);
    expect((await rows(priya, 'toWeighOrMakeUp')).sort()).toEqual([id.Cu, id.NO3].sort());
    expect(await priya.isVisible('[data-testid="worklist-awaitingVerification"]')).toBe(false);

    // QA: only the expiry list, for the whole lab
    const tomasz = await signedIn(QA);
    expect(await tomasz.isVisible('[data-testid="worklist-expiringSoon"]')).toBe(true);
    expect(await tomasz.textContent('[data-testid="worklist-expiringSoon"]')).toContain('Whole lab');
    expect(await tomasz.isVisible('[data-testid="worklist-toWeighOrMakeUp"]')).toBe(false);
    expect(await tomasz.isVisible('[data-testid="worklist-awaitingVerification"]')).toBe(false);

    for (const p of pages) expect(p.problems).toEqual([]);
  });
});
