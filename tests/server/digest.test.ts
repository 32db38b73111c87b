// Daily expiry digest (REQUIREMENTS EX-04 "notify the owner beforehand"): standards expiring within the lab's
// notice period (settings.expiryNoticeDays) grouped by preparer, one e-mail each, received by the local fake
// SMTP server (smtp-server + mailparser, as in mail.test.ts). Days left are calendar-day differences in the lab
// time zone (common practice). Expiry dates are set on the test records with direct updates so the expected
// set is fixed, independent of today's date.
import type { Express } from 'express';
import nodemailer from 'nodemailer';
import cron from 'node-cron';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createApp } from '../../server/app.ts';
import { AuditEntry, FakeMail } from '../../server/db/models/index.ts';
import { EXPIRY_DIGEST_CRON, startScheduler } from '../../server/jobs/scheduler.ts';
import { startFakeSmtpServer, type FakeSmtpServer } from '../../server/mail/fake-smtp.ts';
import { createMailer, type MailTransport, type Mailer } from '../../server/mail/mailer.ts';
import { runExpiryDigest } from '../../server/services/expiry-digest.service.ts';
import { DEMO, makeTestApp, sessionCookie, type TestApp } from './helpers/test-app.ts';

const PUBLIC_URL = 'http://tarebook.harbourside.example:8080';
let t: TestApp;
let smtp: FakeSmtpServer;
let mailer: Mailer;
let app: Express;
const cookie: Record<string, string> = {};
const rec: Record<string, { id: number; identifier: string }> = {};
const CONDITIONS = { temperatureC: '21', pressureHPa: '985', relativeHumidityPct: '45' };

const as = (who: string) => ({
  get: (p: string) => request(app).get(p).set('Cookie', cookie[who]!),
  post: (p: string, body: object) => request(app).post(p).set('Cookie', cookie[who]!).send(body),
  put: (p: string, body: object) => request(app).put(p).set('Cookie', cookie[who]!).send(body),
});

const lastMailId = async () => (await FakeMail.max<number, FakeMail>('id')) ?? 0;
const mailboxAfter = async (id: number) => (await FakeMail.findAll({ order: [['id', 'ASC']] })).filter((m) => m.id > id);

beforeAll(async () => {
  t = await makeTestApp();
  smtp = await startFakeSmtpServer();
  mailer = createMailer({ transport: nodemailer.createTransport({ host: smtp.host, port: smtp.port, secure: false, ignoreTLS: true }) as unknown as MailTransport, from: 'Tarebook <tarebook@harbourside.example>', retryBaseMs: 20, log: () => {} });
  app = createApp({ sequelize: t.sequelize, config: { ...t.config, publicUrl: PUBLIC_URL }, mailer, distDir: t.dir });
  for (const who of ['chemist', 'chemist2', 'technician', 'qa', 'admin'] as const) cookie[who] = await sessionCookie(app, DEMO[who]);
  const items = async (p: string) => (await as('chemist').get(`${p}?pageSize=100`)).body.items as any[];
  const materialId = (await items('/api/materials')).find((m) => m.formula === 'Pb(NO3)2').id;
  const flaskId = (await items('/api/volumetric-ware')).find((w) => w.identifier === 'VF-100-01').id;
  const balanceId = (await items('/api/balances')).find((b) => b.identifier === 'BAL-SM1').id;
  const plan = async (who: string) => {
    const res = await as(who).post('/api/preparations', { materialId, analyteFormula: 'Pb', target: { value: '1000', unit: 'mg/L' }, flaskId, balanceId, conditions: { source: 'measured', ...CONDITIONS } });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    return { id: res.body.id as number, identifier: res.body.identifier as string };
  };
  // A, B, D planned by the chemist; C, E by the second chemist
  for (const [key, who] of [['A', 'chemist'], ['B', 'chemist'], ['C', 'chemist2'], ['D', 'chemist'], ['E', 'chemist2']] as const) rec[key] = await plan(who);
  const setExpiry = (key: string, on: string, status?: string) =>
    t.sequelize.query(`UPDATE preparations SET expires_on = ?${status ? ', status = ?' : ''} WHERE id = ?`, { replacements: status ? [on, status, rec[key]!.id] : [on, rec[key]!.id] });
  await setExpiry('A', '2031-03-05');
  await setExpiry('B', '2031-03-10');
  await setExpiry('C', '2031-03-01');
  await setExpiry('D', '2031-04-30'); // outside a 14-day notice period from 2031-03-01
  await setExpiry('E', '2031-03-04', 'discarded'); // discarded records get no reminder
  await mailer.flush(); // anything the demo seed queued
}, 120_000);
afterAll(async () => {
  mailer.close();
  await smtp.close();
  await t.close();
});

describe('expiry digest', () => {
  it('when the notice period is 14 days, then each preparer gets one e-mail listing only their standards expiring within it, with links', async () => {
    const before = await lastMailId();
    // 2031-03-01 07:00 UTC is 07:00 GMT in Europe/London: lab date 2031-03-01; window 2031-03-01 … 2031-03-15
    const result = await runExpiryDigest(new Date('2031-03-01T07:00:00Z'), { publicUrl: PUBLIC_URL, mailer });
    expect(result).toMatchObject({ sent: 2, noticeDays: 14, on: '2031-03-01' });
    expect(result.recipients).toEqual([
      { email: DEMO.chemist, fullName: 'Dr. Maren Tollefsen', identifiers: [rec.A!.identifier, rec.B!.identifier] },
      { email: DEMO.chemist2, fullName: 'Idris Okonkwo-Baptiste', identifiers: [rec.C!.identifier] },
    ]);
    await mailer.flush();
    const mails = await mailboxAfter(before);
    expect(mails.map((m) => m.toAddress).sort()).toEqual([DEMO.chemist, DEMO.chemist2].sort());
    const maren = mails.find((m) => m.toAddress === DEMO.chemist)!;
    expect(maren.subject).toBe('Expiry digest: 2 standards expiring within 14 days');
    expect(maren.text).toContain(`${rec.A!.identifier} — Pb from Lead(II) nitrate`);
    expect(maren.text).toContain('expires in 4 days, on 2031-03-05'); // 2031-03-01 → 2031-03-05 (calendar days)
    expect(maren.text).toContain('expires in 9 days, on 2031-03-10');
    expect(maren.text).toContain(`${PUBLIC_URL}/preparations/${rec.A!.identifier}`);
    expect(maren.text).not.toContain(rec.D!.identifier);
    expect(maren.text).not.toContain(rec.C!.identifier);
    expect(maren.html).toContain(`<a href="${PUBLIC_URL}/preparations/${rec.B!.identifier}">${rec.B!.identifier}</a>`);
    const idris = mails.find((m) => m.toAddress === DEMO.chemist2)!;
    expect(idris.subject).toBe('Expiry digest: 1 standard expiring within 14 days');
    expect(idris.text).toContain('expires today, on 2031-03-01');
    expect(idris.text).not.toContain(rec.E!.identifier);
    const audit = await AuditEntry.findOne({ where: { action: 'expiry_digest' }, order: [['id', 'DESC']] });
    expect(audit?.actorId).toBeNull();
  });

  it('when the admin shortens the notice period to 3 days, then only what expires by then is sent', async () => {
    const put = await as('admin').put('/api/settings', { expiryNoticeDays: 3 });
    expect(put.status, JSON.stringify(put.body)).toBe(200);
    const result = await runExpiryDigest(new Date('2031-03-01T07:00:00Z'), { publicUrl: PUBLIC_URL, mailer });
    expect(result.recipients).toEqual([{ email: DEMO.chemist2, fullName: 'Idris Okonkwo-Baptiste', identifiers: [rec.C!.identifier] }]);
    await mailer.flush();
  });

  it('when the notice period is not a whole number of days in 0…365, then 400 at the field', async () => {
    for (const bad of [-1, 2.5, 400, '14']) {
      const res = await as('admin').put('/api/settings', { expiryNoticeDays: bad });
      expect(res.status, String(bad)).toBe(400);
      expect(res.body.error.fields).toHaveProperty('expiryNoticeDays');
    }
  });

  it('when the admin runs it now, then the result names who was written to and the mail arrives', async () => {
    await as('admin').put('/api/settings', { expiryNoticeDays: 365 });
    const before = await lastMailId();
    const res = await as('admin').post('/api/admin/expiry-digest', {});
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body.noticeDays).toBe(365);
    expect(res.body.sent).toBe(res.body.recipients.length);
    await mailer.flush();
    const mails = await mailboxAfter(before);
    expect(mails.map((m) => m.toAddress).sort()).toEqual(res.body.recipients.map((r: any) => r.email).sort());
    const audit = await AuditEntry.findOne({ where: { action: 'expiry_digest' }, order: [['id', 'DESC']] });
    expect(audit?.actorName).toBe('Lena Marchetti');
  });

  it.each([
    ['signedOut', 401],
    ['chemist', 403],
    ['technician', 403],
    ['qa', 403],
  ] as const)('POST /api/admin/expiry-digest as %s → %i', async (who, status) => {
    let req = request(app).post('/api/admin/expiry-digest');
    if (who !== 'signedOut') req = req.set('Cookie', cookie[who]!);
    expect((await req.send({})).status).toBe(status);
  });
});

describe('scheduler', () => {
  it('then the daily job is a valid cron expression at 06:00 and runs in the lab time zone', async () => {
    expect(cron.validate(EXPIRY_DIGEST_CRON)).toBe(true);
    expect(EXPIRY_DIGEST_CRON).toBe('0 6 * * *');
    const s = await startScheduler({ publicUrl: () => PUBLIC_URL, mailer, log: () => {} });
    try {
      expect(s.timeZone).toBe('Europe/London');
    } finally {
      await s.stop();
    }
  });
});
