// The home page's work lists (GET /api/worklists, server/services/worklists.service.ts) on the demo lab:
// the TOC record signed "prepared" by the first chemist awaits the second chemist's verification, never its
// preparer's (REQUIREMENTS RV-02, no self-verification); the Cu record (weighed, not made up) and the nitrate
// record (planned only) are to weigh or make up; "expiring soon" counts lab calendar days as the expiry
// digest does (expires on today .. today + notice days, both included; common practice: two weeks' notice).
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Preparation, User } from '../../server/db/models/index.ts';
import { workListsFor } from '../../server/services/worklists.service.ts';
import { addDays } from '../../shared/prep/index.ts';
import type { WorkLists } from '../../shared/schemas/worklists.ts';
import { DEMO, makeTestApp, sessionCookie, type TestApp } from './helpers/test-app.ts';

let t: TestApp;
const cookie: Record<string, string> = {};
const lists = async (who: string): Promise<WorkLists> => {
  const res = await request(t.app).get('/api/worklists').set('Cookie', cookie[who]!);
  expect(res.status, JSON.stringify(res.body)).toBe(200);
  return res.body as WorkLists;
};
const userIdByEmail = async (email: string) => (await User.findOne({ where: { email } }))!.id;
const ids = (l?: { items: Array<{ identifier: string }> }) => (l?.items ?? []).map((i) => i.identifier);
let toc: string, cu: string, no3: string;

beforeAll(async () => {
  t = await makeTestApp();
  for (const who of ['chemist', 'chemist2', 'technician', 'qa', 'admin'] as const) cookie[who] = await sessionCookie(t.app, DEMO[who]);
  const byFormula = async (f: string) => (await Preparation.findOne({ where: { analyteFormula: f } }))!.identifier;
  [toc, cu, no3] = [await byFormula('C'), await byFormula('Cu'), await byFormula('NO3')];
});
afterAll(async () => t?.close());

describe('awaiting my verification', () => {
  it('lists the record another chemist signed "prepared", never to its preparer', async () => {
    expect(ids((await lists('chemist2')).awaitingVerification)).toEqual([toc]);
    const own = (await lists('chemist')).awaitingVerification!;
    expect(ids(own)).toEqual([]); // she signed it "prepared" herself
    expect(own.total).toBe(0);
    expect((await lists('chemist2')).awaitingVerification!.items[0]!.next).toBe('Verify');
  });

  it('is absent for roles that do not verify', async () => {
    for (const who of ['technician', 'qa', 'admin']) expect((await lists(who)).awaitingVerification).toBeUndefined();
  });
});

describe('to weigh or make up', () => {
  it('lists planned records not yet made up, the user\u2019s own first, with the next step', async () => {
    const l = (await lists('chemist')).toWeighOrMakeUp!;
    expect(ids(l)).toEqual([no3, cu]); // nitrate is hers (planned only); Cu was planned by the second chemist
    expect(l.items[0]).toMatchObject({ mine: true, stage: 'planned', next: 'Weigh (or pipette the aliquot)' });
    expect(l.items[1]).toMatchObject({ mine: false, stage: 'weighed', next: 'Make up to the mark' });
    expect(ids((await lists('chemist2')).toWeighOrMakeUp)).toEqual([cu, no3]);
  });

  it('shows the technician the whole lab and QA and admin nothing to weigh', async () => {
    expect(ids((await lists('technician')).toWeighOrMakeUp).sort()).toEqual([cu, no3].sort());
    expect((await lists('qa')).toWeighOrMakeUp).toBeUndefined();
    expect((await lists('admin')).toWeighOrMakeUp).toBeUndefined();
  });

  it('requires a signed-in user', async () => {
    const res = await request(t.app).get('/api/worklists');
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBeDefined();
  });
});

describe('expiring soon', () => {
  it('counts both ends of the notice period and shows a chemist her own records only', async () => {
    const pb = (await Preparation.findOne({ where: { analyteFormula: 'Pb' } }))!;
    const maren = await userIdByEmail(DEMO.chemist);
    const idris = await userIdByEmail(DEMO.chemist2);
    const on = pb.expiresOn;
    // a lab date 14 days before the Pb expiry (noon UTC is the same calendar day in the demo lab's zone)
    const now = new Date(`${addDays(on, -14)}T12:00:00Z`);
    const first = await workListsFor({ id: maren, fullName: 'Dr. Maren Tollefsen', role: 'chemist' }, now);
    expect(first.noticeDays).toBe(14); // demo default (shared/schemas/settings.ts DEFAULT_EXPIRY_NOTICE_DAYS)
    expect(ids(first.expiringSoon)).toContain(pb.identifier);
    expect(first.expiringSoon!.items.find((i) => i.identifier === pb.identifier)).toMatchObject({ daysLeft: 14, next: 'Expires in 14 days', mine: true });
    const dayBefore = await workListsFor({ id: maren, fullName: 'Dr. Maren Tollefsen', role: 'chemist' }, new Date(`${addDays(on, -15)}T12:00:00Z`));
    expect(ids(dayBefore.expiringSoon)).not.toContain(pb.identifier); // 15 days left: outside the period
    const lastDay = await workListsFor({ id: maren, fullName: 'Dr. Maren Tollefsen', role: 'chemist' }, new Date(`${on}T12:00:00Z`));
    expect(lastDay.expiringSoon!.items.find((i) => i.identifier === pb.identifier)?.next).toBe('Expires today');
    // the second chemist did not plan the Pb stock: not in her own list; QA sees the whole lab
    const other = await workListsFor({ id: idris, fullName: 'Idris Okonkwo-Baptiste', role: 'chemist' }, now);
    expect(ids(other.expiringSoon)).not.toContain(pb.identifier);
    const qa = await workListsFor({ id: await userIdByEmail(DEMO.qa), fullName: 'Tomasz Achterberg', role: 'qa' }, now);
    expect(ids(qa.expiringSoon)).toContain(pb.identifier);
    expect(qa.expiringSoon!.scope).toMatch(/Whole lab/);
  });
});
