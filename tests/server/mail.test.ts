// E-mail for the verification workflow: queued with the signature, delivered after commit through nodemailer
// to the local fake SMTP server (smtp-server + mailparser, STACK P12), listed in the admin Outbox.
// A failing transport never rolls back a signature and is retried (common practice: outbox pattern with backoff).
import type { Express } from 'express';
import nodemailer from 'nodemailer';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createApp } from '../../server/app.ts';
import { FakeMail, MailQueueItem, Signature } from '../../server/db/models/index.ts';
import { startFakeSmtpServer, type FakeSmtpServer } from '../../server/mail/fake-smtp.ts';
import { createMailer, type MailTransport, type Mailer, type OutgoingMail } from '../../server/mail/mailer.ts';
import { returnedMail } from '../../server/mail/templates.ts';
import { VERIFICATION_CHECKLIST } from '../../shared/schemas/preparations.ts';
import { DEMO, DEMO_PASSWORD, makeTestApp, sessionCookie, type TestApp } from './helpers/test-app.ts';
import { freeFlask } from './helpers/free-flask.ts';

const PUBLIC_URL = 'http://tarebook.harbourside.example:8080';
let t: TestApp;
let smtp: FakeSmtpServer;
let mailer: Mailer;
let app: Express;
const cookie: Record<string, string> = {};
const ids = { material: 0, flask: 0, balance: 0, water: { id: 0, lot: '' } };
const CONDITIONS = { temperatureC: '21', pressureHPa: '985', relativeHumidityPct: '45' };

const as = (who: string, a: Express = app) => ({
  get: (p: string) => request(a).get(p).set('Cookie', cookie[who]!),
  post: (p: string, body: object) => request(a).post(p).set('Cookie', cookie[who]!).send(body),
});

async function completeRecord(a: Express = app) {
  const p = await as('chemist', a).post('/api/preparations', {
    materialId: ids.material,
    analyteFormula: 'Pb',
    target: { value: '1000', unit: 'mg/L' },
    flaskId: ids.flask,
    balanceId: ids.balance,
    conditions: { source: 'measured', ...CONDITIONS },
  });
  expect(p.status, JSON.stringify(p.body)).toBe(201);
  expect((await as('chemist', a).post(`/api/preparations/${p.body.identifier}/weighings`, { mode: 'direct', reading: '160.07', unit: 'mg', conditions: CONDITIONS })).status).toBe(201);
  const m = await as('chemist', a).post(`/api/preparations/${p.body.identifier}/make-up`, { flaskIdentifier: (await freeFlask(app, cookie.chemist!)).identifier, solventId: ids.water.id, solventLot: ids.water.lot, solutionTemperatureC: '20.0', applyTemperatureCorrection: false });
  expect(m.status, JSON.stringify(m.body)).toBe(201);
  return m.body as { id: number; identifier: string };
}

const sign = (who: string, key: string, meaning: string, extra: object = {}, a: Express = app) =>
  as(who, a).post(`/api/preparations/${key}/signatures`, { meaning, password: DEMO_PASSWORD, acknowledgeResponsibility: true, ...extra });

const mailbox = async (afterId: number) => (await FakeMail.findAll({ order: [['id', 'ASC']] })).filter((m) => m.id > afterId);
const lastMailId = async () => (await FakeMail.max<number, FakeMail>('id')) ?? 0;

beforeAll(async () => {
  t = await makeTestApp();
  smtp = await startFakeSmtpServer();
  mailer = createMailer({ transport: nodemailer.createTransport({ host: smtp.host, port: smtp.port, secure: false, ignoreTLS: true }) as unknown as MailTransport, from: 'Tarebook <tarebook@harbourside.example>', retryBaseMs: 20, log: () => {} });
  app = createApp({ sequelize: t.sequelize, config: { ...t.config, publicUrl: PUBLIC_URL }, mailer, distDir: t.dir });
  for (const who of ['chemist', 'chemist2', 'technician', 'qa', 'admin'] as const) cookie[who] = await sessionCookie(app, DEMO[who]);
  const items = async (p: string) => (await as('chemist').get(p)).body.items as any[];
  ids.material = (await items('/api/materials')).find((m) => m.formula === 'Pb(NO3)2').id;
  ids.flask = (await items('/api/volumetric-ware')).find((w) => w.identifier === 'VF-100-01').id;
  ids.balance = (await items('/api/balances')).find((b) => b.identifier === 'BAL-SM1').id;
  const w = (await items('/api/solvents')).find((s) => s.name === 'Ultrapure water');
  ids.water = { id: w.id, lot: w.lot };
  await mailer.flush(); // the demo seed's queued messages
}, 60_000);
afterAll(async () => {
  mailer.close();
  await smtp.close();
  await t.close();
});

describe('verification e-mails through the fake SMTP server', () => {
  it('when a record is signed prepared, then every other active chemist gets "verification requested" with the link; not the preparer', async () => {
    const p = await completeRecord();
    const since = await lastMailId();
    expect((await sign('chemist', p.identifier, 'prepared')).status).toBe(201);
    await mailer.flush();
    const got = await mailbox(since);
    const to = got.map((m) => m.toAddress).sort();
    expect(to).toContain(DEMO.chemist2);
    expect(to).not.toContain(DEMO.chemist); // the preparer
    expect(to).not.toContain(DEMO.inactive); // deactivated chemist
    expect(to).not.toContain(DEMO.technician);
    const m = got.find((x) => x.toAddress === DEMO.chemist2)!;
    expect(m.subject).toBe(`Verification requested: ${p.identifier}`);
    expect(m.fromAddress).toContain('tarebook@harbourside.example');
    expect(m.text).toContain(`${PUBLIC_URL}/preparations/${p.identifier}`);
    expect(m.html).toContain(`href="${PUBLIC_URL}/preparations/${p.identifier}"`);
    expect(m.text).toContain('Dr. Maren Tollefsen');
  });

  it('when the verifier returns it, then the preparer gets "returned" with the reason; when verified, the preparer gets "verified"', async () => {
    const p = await completeRecord();
    expect((await sign('chemist', p.identifier, 'prepared')).status).toBe(201);
    await mailer.flush();
    let since = await lastMailId();
    expect((await sign('chemist2', p.identifier, 'returned', { reason: 'Solvent lot <not> on the bottle label' })).status).toBe(201);
    await mailer.flush();
    let got = await mailbox(since);
    expect(got).toHaveLength(1);
    expect(got[0]).toMatchObject({ toAddress: DEMO.chemist, subject: `Returned for correction: ${p.identifier}` });
    expect(got[0]!.text).toContain('Reason: Solvent lot <not> on the bottle label');
    expect(got[0]!.html).toContain('Solvent lot &lt;not&gt; on the bottle label'); // escaped in HTML
    expect(got[0]!.text).toContain(`${PUBLIC_URL}/preparations/${p.identifier}`);

    expect((await sign('chemist', p.identifier, 'prepared')).status).toBe(201);
    await mailer.flush();
    since = await lastMailId();
    const checklist = Object.fromEntries(VERIFICATION_CHECKLIST.map((c) => [c.key, true]));
    expect((await sign('chemist2', p.identifier, 'verified', { checklist })).status).toBe(201);
    await mailer.flush();
    got = await mailbox(since);
    expect(got.map((m) => [m.toAddress, m.subject])).toEqual([[DEMO.chemist, `Verified: ${p.identifier}`]]);
    expect(got[0]!.text).toContain('Idris Okonkwo-Baptiste');
    expect(got[0]!.text).toContain(`${PUBLIC_URL}/preparations/${p.identifier}`);
  });

  it('the outbox lists what the fake server received (admin only) and shows one message in full', async () => {
    const list = await as('admin').get('/api/outbox');
    expect(list.status).toBe(200);
    expect(list.body.items.length).toBeGreaterThan(0);
    const first = list.body.items[0];
    expect(first).toEqual({ id: expect.any(Number), to: expect.any(String), subject: expect.any(String), receivedAt: expect.stringMatching(/Z$/) });
    const one = await as('admin').get(`/api/outbox/${first.id}`);
    expect(one.status).toBe(200);
    expect(one.body).toMatchObject({ id: first.id, to: first.to, subject: first.subject, from: expect.stringContaining('@'), text: expect.any(String), html: expect.stringContaining('<a href=') });
    for (const who of ['chemist', 'technician', 'qa']) {
      expect((await as(who).get('/api/outbox')).status, who).toBe(403);
      expect((await as(who).get(`/api/outbox/${first.id}`)).status, who).toBe(403);
    }
    expect((await request(app).get('/api/outbox')).status).toBe(401);
    expect((await request(app).get(`/api/outbox/${first.id}`)).status).toBe(401);
    expect((await as('admin').get('/api/outbox/999999')).status).toBe(404);
    expect((await as('admin').get('/api/outbox/abc')).status).toBe(404);
  });
});

describe('delivery failures', () => {
  it('when the transport fails, then the signature stands, the mail stays queued with the error, and a retry delivers it', async () => {
    const sent: OutgoingMail[] = [];
    let failures = 2;
    const flaky: MailTransport = {
      async sendMail(m) {
        if (failures > 0) {
          failures--;
          throw new Error('connect ECONNREFUSED 127.0.0.1:2525');
        }
        sent.push(m);
      },
    };
    const flakyMailer = createMailer({ transport: flaky, from: 'Tarebook <tarebook@harbourside.example>', retryBaseMs: 20, log: () => {} });
    const flakyApp = createApp({ sequelize: t.sequelize, config: { ...t.config, publicUrl: PUBLIC_URL }, mailer: flakyMailer, distDir: t.dir });
    try {
      const p = await completeRecord(flakyApp);
      const r = await sign('chemist', p.identifier, 'prepared', {}, flakyApp);
      expect(r.status, JSON.stringify(r.body)).toBe(201);
      expect(r.body.status).toBe('prepared');
      expect(await Signature.count({ where: { preparationId: p.id, meaning: 'prepared' } })).toBe(1);
      // the first attempt fails: the row records the error and a later attempt time
      await new Promise((res) => setTimeout(res, 10));
      const rows = await MailQueueItem.findAll({ where: { preparationId: p.id } });
      expect(rows.length).toBeGreaterThan(0);
      await flakyMailer.flush();
      const after = await MailQueueItem.findAll({ where: { preparationId: p.id } });
      expect(after.every((m) => m.status === 'sent')).toBe(true);
      expect(Math.max(...after.map((m) => m.attempts))).toBeGreaterThanOrEqual(2);
      expect(sent.some((m) => m.to === DEMO.chemist2 && m.subject === `Verification requested: ${p.identifier}`)).toBe(true);
      expect((await as('chemist', flakyApp).get(`/api/preparations/${p.identifier}`)).body.status).toBe('prepared');
    } finally {
      flakyMailer.close();
    }
  });

  it('when the transport never works, then the row is marked failed after the maximum attempts and the signature is kept', async () => {
    const dead: MailTransport = { sendMail: async () => Promise.reject(new Error('550 relay denied')) };
    const deadMailer = createMailer({ transport: dead, from: 'x@harbourside.example', retryBaseMs: 5, maxAttempts: 3, log: () => {} });
    const deadApp = createApp({ sequelize: t.sequelize, config: { ...t.config, publicUrl: PUBLIC_URL }, mailer: deadMailer, distDir: t.dir });
    try {
      const p = await completeRecord(deadApp);
      expect((await sign('chemist', p.identifier, 'prepared', {}, deadApp)).status).toBe(201);
      await deadMailer.flush();
      const rows = await MailQueueItem.findAll({ where: { preparationId: p.id } });
      expect(rows.length).toBeGreaterThan(0);
      for (const row of rows) expect(row).toMatchObject({ status: 'failed', attempts: 3, lastError: '550 relay denied' });
      expect((await as('chemist', deadApp).get(`/api/preparations/${p.identifier}`)).body.status).toBe('prepared');
    } finally {
      deadMailer.close();
    }
  });

  it('when the app has no mailer, then signing still works and the mail waits in the queue', async () => {
    const p = await completeRecord(t.app);
    expect((await sign('chemist', p.identifier, 'prepared', {}, t.app)).status).toBe(201);
    const rows = await MailQueueItem.findAll({ where: { preparationId: p.id } });
    expect(rows.length).toBeGreaterThan(0);
    expect(rows.every((r) => r.status === 'pending' && r.attempts === 0)).toBe(true);
    await mailer.flush(); // a mailer started later delivers them
    expect((await MailQueueItem.findAll({ where: { preparationId: p.id } })).every((r) => r.status === 'sent')).toBe(true);
  });
});

describe('templates', () => {
  it('escapes names and reasons in HTML and keeps them verbatim in text', () => {
    const m = returnedMail({ identifier: 'HWL-2026-0001', materialName: 'Lead "nitrate" & co', analyteFormula: 'Pb', version: 3 }, 'A <b>B</b>', 'x < y', 'http://h/');
    expect(m.text).toContain('A <b>B</b> returned HWL-2026-0001 (Pb from Lead "nitrate" & co, version 3)');
    expect(m.text).toContain('http://h/preparations/HWL-2026-0001');
    expect(m.html).toContain('A &lt;b&gt;B&lt;/b&gt;');
    expect(m.html).toContain('Lead &quot;nitrate&quot; &amp; co');
    expect(m.html).not.toContain('<b>B</b>');
  });
});
