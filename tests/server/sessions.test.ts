// Sessions the server can end, temporary passwords, one person per signing name, password rules
// (issue 10 §2, §3; 21 CFR 11.10(d), 11.100(a), 11.300; EU GMP Annex 11 §12; NIST SP 800-63B §5.1.1.2).
// Route × role matrix of POST /api/auth/logout-everywhere, POST /api/auth/password and POST /api/sessions/:id/end
// (roles.test.ts points here): signed out 401; chemist, technician, qa, admin as below.
import { QueryTypes } from 'sequelize';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { SESSION_ABSOLUTE_HOURS } from '../../server/services/sessions.service.ts';
import { AuditEntry, Preparation, User } from '../../server/db/models/index.ts';
import { VERIFICATION_CHECKLIST } from '../../shared/schemas/preparations.ts';
import { passwordProblem, PASSWORD_MESSAGES } from '../../shared/schemas/password-rules.ts';
import {
  choosePassword,
  DEMO,
  DEMO_PASSWORD,
  makeTestApp,
  sessionCookie,
  TEMPORARY_PASSWORD,
  type TestApp,
} from './helpers/test-app.ts';

let t: TestApp;
let admin: string;
let serial = 0;

beforeAll(async () => {
  t = await makeTestApp();
  admin = await sessionCookie(t.app, DEMO.admin);
});
afterAll(() => t.close());

const me = (cookie: string) => request(t.app).get('/api/auth/me').set('Cookie', cookie);
const materials = (cookie: string) => request(t.app).get('/api/materials').set('Cookie', cookie);

/** A fresh chemist account with its own chosen password; returns its id, e-mail, password and a session cookie. */
async function person(role = 'chemist') {
  serial += 1;
  const email = `analyst${serial}.sessions@harbourside.example`;
  const names = ['Rowan', 'Elsa', 'Tariq', 'Noor', 'Kasimir', 'Ines', 'Bruno', 'Hedda', 'Yusuf', 'Greta', 'Oskar', 'Mira', 'Teodor', 'Ayla'];
  const fullName = `${names[serial % names.length]} Quayside ${serial}`;
  const res = await request(t.app).post('/api/users').set('Cookie', admin).send({ email, fullName, initials: 'RQ', role, password: TEMPORARY_PASSWORD });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  const password = `marble-quartz-${serial}-lamp`;
  const cookie = await choosePassword(t.app, email, password);
  return { id: res.body.user.id as number, email, password, cookie };
}

async function sessionRows(userId: number) {
  return t.sequelize.query<{ id: string; ended_at: string | null; ended_reason: string | null; last_seen_at: string; created_at: string }>(
    'SELECT id, ended_at, ended_reason, last_seen_at, created_at FROM sessions WHERE user_id = :userId ORDER BY created_at, rowid',
    { type: QueryTypes.SELECT, replacements: { userId } },
  );
}
const openSessions = async (userId: number) => (await sessionRows(userId)).filter((r) => r.ended_at === null);

function cookieFrom(res: request.Response): string {
  const c = ([] as string[]).concat(res.headers['set-cookie'] ?? []).find((x) => x.startsWith('tarebook_session='));
  expect(c).toBeDefined();
  return c!.split(';')[0]!;
}

describe('the cookie carries only a session id, checked against the sessions table', () => {
  it('when signed in, then a sessions row exists and a forged or unknown cookie is 401', async () => {
    const p = await person();
    expect((await me(p.cookie)).status).toBe(200);
    expect(await openSessions(p.id)).toHaveLength(1); // the temporary password's session ended with the change
    expect((await me('tarebook_session=not-a-sealed-value')).status).toBe(401);
  });

  it('when a signed-in request is checked, then it costs one query (the session and its user by primary key)', async () => {
    const p = await person();
    await me(p.cookie); // warms the idle-timeout cache (read at most once a minute)
    const seen: string[] = [];
    const hook = (_options: unknown, query: { sql?: string }) => void seen.push(String(query?.sql ?? ''));
    t.sequelize.addHook('afterQuery', 'count', hook as never);
    try {
      expect((await me(p.cookie)).status).toBe(200);
    } finally {
      t.sequelize.removeHook('afterQuery', 'count');
    }
    expect(seen).toHaveLength(1);
    expect(seen[0]).toMatch(/FROM sessions s JOIN users u ON u\.id = s\.user_id WHERE s\.id = /);
  });

  it('when a request comes within a minute of the last one, then last_seen_at is not rewritten; after a minute it is', async () => {
    const p = await person();
    const [row] = await openSessions(p.id);
    await me(p.cookie);
    expect((await openSessions(p.id))[0]!.last_seen_at).toBe(row!.last_seen_at);
    const earlier = new Date(Date.now() - 2 * 60_000).toISOString();
    await t.sequelize.query('UPDATE sessions SET last_seen_at = :earlier WHERE id = :id', { replacements: { earlier, id: row!.id } });
    await me(p.cookie);
    await new Promise((r) => setTimeout(r, 50)); // the touch is not awaited by the request
    expect((await openSessions(p.id))[0]!.last_seen_at > earlier).toBe(true);
  });
});

describe('every revocation path refuses the old cookie afterwards', () => {
  it('logout: the copied cookie is 401 and the row says sign_out', async () => {
    const p = await person();
    const other = await sessionCookie(t.app, p.email, p.password); // a second browser stays signed in
    expect((await request(t.app).post('/api/auth/logout').set('Cookie', p.cookie)).status).toBe(204);
    expect((await me(p.cookie)).status).toBe(401);
    expect((await me(other)).status).toBe(200);
    expect((await sessionRows(p.id)).map((r) => r.ended_reason)).toContain('sign_out');
  });

  it('password change by its owner: every earlier session ends; the browser that changed it gets a fresh cookie', async () => {
    const p = await person();
    const other = await sessionCookie(t.app, p.email, p.password);
    const res = await request(t.app).post('/api/auth/password').set('Cookie', p.cookie).send({ currentPassword: p.password, newPassword: 'granite-harbour-lantern' });
    expect(res.status).toBe(200);
    const fresh = cookieFrom(res);
    expect((await me(p.cookie)).status).toBe(401);
    expect((await me(other)).status).toBe(401);
    expect((await me(fresh)).status).toBe(200);
    expect((await request(t.app).post('/api/auth/login').send({ email: p.email, password: p.password })).status).toBe(401);
    const entry = await AuditEntry.findOne({ where: { action: 'password_changed', entityId: String(p.id) }, order: [['id', 'DESC']] });
    expect(entry!.actorId).toBe(p.id);
    expect(JSON.parse(entry!.changes)).toContainEqual({ field: 'sessionsEnded', newValue: 2, oldValue: null });
    expect(entry!.changes).not.toContain('granite-harbour-lantern');
  });

  it('password reset by an administrator: the cookie is 401 with a message that says why', async () => {
    const p = await person();
    const res = await request(t.app).post(`/api/users/${p.id}/password`).set('Cookie', admin).send({ password: 'admin-chosen-reset-77' });
    expect(res.status).toBe(200);
    const after = await me(p.cookie);
    expect(after.status).toBe(401);
    expect(after.body.error).toMatchObject({ code: 'unauthenticated', message: expect.stringMatching(/password .* changed/) });
    expect((await sessionRows(p.id)).at(-1)!.ended_reason).toBe('password_reset');
  });

  it('lock after repeated wrong passwords: the open session is 401 at once', async () => {
    const p = await person();
    for (let i = 0; i < 5; i++) await request(t.app).post('/api/auth/login').send({ email: p.email, password: 'wrong-guess-here' });
    expect((await User.findByPk(p.id))!.lockedAt).not.toBeNull();
    expect((await me(p.cookie)).status).toBe(401);
    expect((await sessionRows(p.id)).at(-1)!.ended_reason).toBe('locked');
  });

  it('lock set behind the application\'s back: the next request ends the session (locked)', async () => {
    const p = await person();
    await t.sequelize.query('UPDATE users SET locked_at = :at WHERE id = :id', { replacements: { at: new Date().toISOString(), id: p.id } });
    expect((await me(p.cookie)).status).toBe(401);
    expect((await sessionRows(p.id)).at(-1)!.ended_reason).toBe('locked');
  });

  it('deactivation: the cookie is 401 and every session ended', async () => {
    const p = await person();
    expect((await request(t.app).patch(`/api/users/${p.id}`).set('Cookie', admin).send({ active: false })).status).toBe(200);
    expect((await me(p.cookie)).status).toBe(401);
    expect(await openSessions(p.id)).toEqual([]);
    expect((await sessionRows(p.id)).at(-1)!.ended_reason).toBe('deactivated');
  });

  it('idle timeout (default 30 min): a session last seen 31 min ago is 401, ended as idle, and audited', async () => {
    const p = await person();
    const [row] = await openSessions(p.id);
    await t.sequelize.query('UPDATE sessions SET last_seen_at = :at WHERE id = :id', { replacements: { at: new Date(Date.now() - 31 * 60_000).toISOString(), id: row!.id } });
    const res = await me(p.cookie);
    expect(res.status).toBe(401);
    expect(res.body.error.message).toMatch(/without activity/);
    expect((await sessionRows(p.id)).at(-1)!.ended_reason).toBe('idle');
    expect(await AuditEntry.count({ where: { action: 'session_ended', entityId: row!.id } })).toBe(1);
  });

  it('idle timeout is a lab setting: at 5 min, a session last seen 6 min ago is 401; 4 min ago still works', async () => {
    expect((await request(t.app).put('/api/settings').set('Cookie', admin).send({ sessionIdleMinutes: 5 })).status).toBe(200);
    try {
      const p = await person();
      const q = await person();
      const set = async (userId: number, minutes: number) => {
        const [row] = await openSessions(userId);
        await t.sequelize.query('UPDATE sessions SET last_seen_at = :at WHERE id = :id', { replacements: { at: new Date(Date.now() - minutes * 60_000).toISOString(), id: row!.id } });
      };
      await set(p.id, 6);
      await set(q.id, 4);
      expect((await me(p.cookie)).status).toBe(401);
      expect((await me(q.cookie)).status).toBe(200);
    } finally {
      expect((await request(t.app).put('/api/settings').set('Cookie', admin).send({ sessionIdleMinutes: 30 })).status).toBe(200);
    }
  });

  it('idle timeout setting: outside 5 to 480 minutes is 400 with the field', async () => {
    const res = await request(t.app).put('/api/settings').set('Cookie', admin).send({ sessionIdleMinutes: 1 });
    expect(res.status).toBe(400);
    expect(res.body.error.fields).toEqual({ sessionIdleMinutes: 'Use 5 to 480 minutes' });
  });

  it(`absolute limit (${SESSION_ABSOLUTE_HOURS} h): a session signed in longer ago is 401 even when active`, async () => {
    const p = await person();
    const [row] = await openSessions(p.id);
    await t.sequelize.query('UPDATE sessions SET created_at = :at WHERE id = :id', {
      replacements: { at: new Date(Date.now() - (SESSION_ABSOLUTE_HOURS * 60 + 1) * 60_000).toISOString(), id: row!.id },
    });
    const res = await me(p.cookie);
    expect(res.status).toBe(401);
    expect((await sessionRows(p.id)).find((r) => r.id === row!.id)!.ended_reason).toBe('expired');
  });

  it('sign out everywhere: every session of the account is 401, other accounts are untouched', async () => {
    const p = await person();
    const other = await sessionCookie(t.app, p.email, p.password);
    const res = await request(t.app).post('/api/auth/logout-everywhere').set('Cookie', p.cookie);
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ sessionsEnded: 2 });
    expect((await me(p.cookie)).status).toBe(401);
    expect((await me(other)).status).toBe(401);
    expect((await me(admin)).status).toBe(200);
    expect(await AuditEntry.count({ where: { action: 'sign_out_everywhere', actorId: p.id } })).toBe(1);
  });

  it('an administrator ends one session: that cookie is 401, the person\'s other session works', async () => {
    const p = await person();
    const other = await sessionCookie(t.app, p.email, p.password);
    const [first] = await openSessions(p.id);
    const res = await request(t.app).post(`/api/sessions/${first!.id}/end`).set('Cookie', admin);
    expect(res.status).toBe(204);
    expect((await me(p.cookie)).status).toBe(401);
    expect((await me(other)).status).toBe(200);
    const again = await request(t.app).post(`/api/sessions/${first!.id}/end`).set('Cookie', admin);
    expect(again.status).toBe(409);
    expect((await request(t.app).post('/api/sessions/no-such-session-id/end').set('Cookie', admin)).status).toBe(404);
  });
});

describe('route × role: logout-everywhere, password, sessions', () => {
  const roles = { chemist: DEMO.chemist, technician: DEMO.technician, qa: DEMO.qa, admin: DEMO.admin } as const;

  it('signed out: 401 on all four', async () => {
    expect((await request(t.app).post('/api/auth/logout-everywhere')).status).toBe(401);
    expect((await request(t.app).post('/api/auth/password').send({})).status).toBe(401);
    expect((await request(t.app).get('/api/sessions')).status).toBe(401);
    expect((await request(t.app).post('/api/sessions/abcdefghijklmnop/end')).status).toBe(401);
  });

  it.each(Object.entries(roles))('%s: password change allowed (400 on an empty body), sessions list for qa and admin, end for admin', async (who, email) => {
    const c = await sessionCookie(t.app, email, DEMO_PASSWORD);
    const change = await request(t.app).post('/api/auth/password').set('Cookie', c).send({});
    expect(change.status).toBe(400);
    expect(Object.keys(change.body.error.fields).sort()).toEqual(['currentPassword', 'newPassword']);
    expect((await request(t.app).get('/api/sessions').set('Cookie', c)).status).toBe(who === 'qa' || who === 'admin' ? 200 : 403);
    const [mine] = await t.sequelize.query<{ id: string }>(
      'SELECT s.id FROM sessions s JOIN users u ON u.id = s.user_id WHERE u.email = :email AND s.ended_at IS NULL ORDER BY s.created_at DESC LIMIT 1',
      { type: QueryTypes.SELECT, replacements: { email } },
    );
    const end = await request(t.app).post(`/api/sessions/${mine!.id}/end`).set('Cookie', c);
    expect(end.status).toBe(who === 'admin' ? 204 : 403);
    if (who !== 'admin') {
      const out = await request(t.app).post('/api/auth/logout-everywhere').set('Cookie', c);
      expect(out.status).toBe(200);
      expect((await me(c)).status).toBe(401);
    }
  });

  it('when QA lists active sessions, then each shows who, when signed in, last seen and when it ends; ended ones are gone', async () => {
    const qa = await sessionCookie(t.app, DEMO.qa);
    const p = await person();
    const list = await request(t.app).get('/api/sessions').set('Cookie', qa);
    expect(list.status).toBe(200);
    const mine = list.body.items.find((s: { userId: number }) => s.userId === p.id);
    expect(mine).toMatchObject({ fullName: expect.stringContaining('Quayside'), role: 'chemist', createdAt: expect.any(String), lastSeenAt: expect.any(String), idleExpiresAt: expect.any(String), expiresAt: expect.any(String) });
    await request(t.app).post('/api/auth/logout').set('Cookie', p.cookie);
    const after = await request(t.app).get('/api/sessions').set('Cookie', qa);
    expect(after.body.items.find((s: { userId: number }) => s.userId === p.id)).toBeUndefined();
  });
});

describe('a password an administrator set is temporary', () => {
  it('when a new account signs in, then me says mustChangePassword and every other API is 403 password_change_required', async () => {
    const email = 'temporary.first@harbourside.example';
    const created = await request(t.app).post('/api/users').set('Cookie', admin).send({ email, fullName: 'Vera Lindholm', initials: 'VL', role: 'chemist', password: TEMPORARY_PASSWORD });
    expect(created.body.user.mustChangePassword).toBe(true);
    const login = await request(t.app).post('/api/auth/login').send({ email, password: TEMPORARY_PASSWORD });
    expect(login.status).toBe(200);
    expect(login.body.user.mustChangePassword).toBe(true);
    const c = cookieFrom(login);
    expect((await me(c)).status).toBe(200);
    for (const [method, path] of [['get', '/api/materials'], ['get', '/api/preparations'], ['get', '/api/settings'], ['post', '/api/calc/preparation']] as const) {
      const res = await request(t.app)[method](path).set('Cookie', c).send({});
      expect(res.status, path).toBe(403);
      expect(res.body.error.code, path).toBe('password_change_required');
    }
    // the new password must differ from the temporary one
    const same = await request(t.app).post('/api/auth/password').set('Cookie', c).send({ currentPassword: TEMPORARY_PASSWORD, newPassword: TEMPORARY_PASSWORD });
    expect(same.status).toBe(400);
    expect(same.body.error.fields).toEqual({ newPassword: 'Choose a password different from the current one' });
    const wrong = await request(t.app).post('/api/auth/password').set('Cookie', c).send({ currentPassword: 'not-the-temporary-one', newPassword: 'cobalt-meadow-sextant' });
    expect(wrong.status).toBe(400);
    expect(wrong.body.error.fields).toEqual({ currentPassword: 'This is not your current password' });
    const ok = await request(t.app).post('/api/auth/password').set('Cookie', c).send({ currentPassword: TEMPORARY_PASSWORD, newPassword: 'cobalt-meadow-sextant' });
    expect(ok.status).toBe(200);
    expect(ok.body.user.mustChangePassword).toBe(false);
    expect((await materials(cookieFrom(ok))).status).toBe(200);
  });

  it('when an admin resets a chemist\'s password and signs in as them, then "verified" is refused until the chemist chooses their own (issue 10 §2)', async () => {
    const toc = await Preparation.findOne({ where: { status: 'prepared' } });
    expect(toc).not.toBeNull();
    const idris = (await User.findOne({ where: { email: DEMO.chemist2 } }))!;
    const reset = await request(t.app).post(`/api/users/${idris.id}/password`).set('Cookie', admin).send({ password: 'known-to-the-admin-42' });
    expect(reset.status).toBe(200);
    expect(reset.body.user.mustChangePassword).toBe(true);
    const asIdris = await sessionCookie(t.app, DEMO.chemist2, 'known-to-the-admin-42');
    const checklist = Object.fromEntries(VERIFICATION_CHECKLIST.map((c) => [c.key, true]));
    const body = { meaning: 'verified', password: 'known-to-the-admin-42', checklist, acknowledgeResponsibility: true };
    const refused = await request(t.app).post(`/api/preparations/${toc!.identifier}/signatures`).set('Cookie', asIdris).send(body);
    expect(refused.status).toBe(403);
    expect(refused.body.error.code).toBe('password_change_required');
    expect((await Preparation.findByPk(toc!.id))!.status).toBe('prepared');
    // the service refuses too (not only the route gate)
    const { sign } = await import('../../server/services/signatures.service.ts');
    await expect(sign(toc!.identifier, body as never, { id: idris.id, fullName: idris.fullName, role: 'chemist' } as never, { lockoutThreshold: 5, publicUrl: 'http://localhost' })).rejects.toMatchObject({ status: 403, code: 'password_change_required' });
    // once Idris chooses his own, he can sign
    const mine = await choosePassword(t.app, DEMO.chemist2, 'saffron-kettle-2026', 'known-to-the-admin-42');
    const signed = await request(t.app).post(`/api/preparations/${toc!.identifier}/signatures`).set('Cookie', mine).send({ ...body, password: 'saffron-kettle-2026' });
    expect(signed.status, JSON.stringify(signed.body)).toBe(201);
  });

  it('then the seeded demo accounts are not temporary (they would be unusable)', async () => {
    const temporary = await User.count({ where: { email: Object.values(DEMO).filter((e) => e !== DEMO.chemist2), mustChangePassword: true } });
    expect(temporary).toBe(0);
  });
});

describe('one person, one signing name (21 CFR 11.100(a))', () => {
  it('when an admin creates a second active account with the same name and initials, then 409 naming both fields', async () => {
    const res = await request(t.app).post('/api/users').set('Cookie', admin).send({ email: 'maren.second@harbourside.example', fullName: 'dr.  maren tollefsen', initials: 'mt', role: 'chemist', password: TEMPORARY_PASSWORD });
    expect(res.status).toBe(409);
    expect(res.body.error).toMatchObject({ code: 'conflict', fields: { fullName: expect.any(String), initials: expect.any(String) } });
    expect(await User.count({ where: { email: 'maren.second@harbourside.example' } })).toBe(0);
  });

  it('when an account is renamed or reactivated into a twin of an active one, then 409; a deactivated holder frees the name', async () => {
    const a = await request(t.app).post('/api/users').set('Cookie', admin).send({ email: 'twin.a@harbourside.example', fullName: 'Lio Marsh', initials: 'LM', role: 'technician', password: TEMPORARY_PASSWORD });
    expect(a.status).toBe(201);
    const b = await request(t.app).post('/api/users').set('Cookie', admin).send({ email: 'twin.b@harbourside.example', fullName: 'Lio Marsh-Kerr', initials: 'LM', role: 'technician', password: TEMPORARY_PASSWORD });
    expect(b.status).toBe(201);
    const rename = await request(t.app).patch(`/api/users/${b.body.user.id}`).set('Cookie', admin).send({ fullName: 'Lio Marsh' });
    expect(rename.status).toBe(409);
    expect(rename.body.error.fields).toHaveProperty('fullName');
    expect((await request(t.app).patch(`/api/users/${a.body.user.id}`).set('Cookie', admin).send({ active: false })).status).toBe(200);
    expect((await request(t.app).patch(`/api/users/${b.body.user.id}`).set('Cookie', admin).send({ fullName: 'Lio Marsh' })).status).toBe(200);
    const reactivate = await request(t.app).patch(`/api/users/${a.body.user.id}`).set('Cookie', admin).send({ active: true });
    expect(reactivate.status).toBe(409);
    expect(reactivate.body.error.fields).toHaveProperty('initials');
  });
});

describe('password rules (NIST SP 800-63B §5.1.1.2; lab choice: at least 12 characters)', () => {
  it.each([
    ['eleven-char', PASSWORD_MESSAGES.tooShort], // 11 characters: under the lab's 12 (NIST's floor is 8)
    ['password1234', PASSWORD_MESSAGES.common], // NIST: "passwords obtained from previous breach corpuses" / commonly used
    ['Qwerty123456', PASSWORD_MESSAGES.common],
    ['zzzzzzzzzzzzzz', PASSWORD_MESSAGES.repeated], // NIST: "repetitive or sequential characters"
    ['my-tarebook-login', PASSWORD_MESSAGES.application], // NIST: "context-specific words, such as the name of the service"
    ['é'.repeat(37), PASSWORD_MESSAGES.tooLong], // 74 bytes in UTF-8: bcrypt reads only 72
  ])('when the password is %j, then %s', (password, message) => {
    expect(passwordProblem(password)).toBe(message);
  });

  it.each([
    ['vera.lindholm@harbourside.example', 'Vera Lindholm', 'vera.lindholm-2026!'], // NIST: "the username"
    ['vl@harbourside.example', 'Vera Lindholm', 'lindholm-bench-key'], // a part of the name
    ['vl@harbourside.example', 'Vera Lindholm', 'VeraLindholm2026'], // the whole name
  ])('when the password for %s (%s) is %j, then it is refused as personal', (email, fullName, password) => {
    expect(passwordProblem(password, { email, fullName })).toBe(PASSWORD_MESSAGES.personal);
  });

  it('when a password passes, then null; twelve characters exactly are enough', () => {
    expect(passwordProblem('twelve-chars')).toBeNull();
    expect(passwordProblem('bench-demo-2026', { email: DEMO.chemist, fullName: 'Dr. Maren Tollefsen' })).toBeNull();
  });

  it('when an admin creates an account or sets a password with the person\'s name in it, then 400 on fields.password', async () => {
    const created = await request(t.app).post('/api/users').set('Cookie', admin).send({ email: 'hollis.quarry@harbourside.example', fullName: 'Hollis Quarry', initials: 'HQ', role: 'qa', password: 'hollis-in-the-lab' });
    expect(created.status).toBe(400);
    expect(created.body.error.fields).toEqual({ password: PASSWORD_MESSAGES.personal });
    const maren = (await User.findOne({ where: { email: DEMO.chemist } }))!;
    const reset = await request(t.app).post(`/api/users/${maren.id}/password`).set('Cookie', admin).send({ password: 'tollefsen-spring-2027' });
    expect(reset.status).toBe(400);
    expect(reset.body.error.fields).toEqual({ password: PASSWORD_MESSAGES.personal });
  });

  it('when someone changes their own password to one with their e-mail in it, then 400 on fields.newPassword', async () => {
    const p = await person();
    const local = p.email.split('@')[0]!;
    const res = await request(t.app).post('/api/auth/password').set('Cookie', p.cookie).send({ currentPassword: p.password, newPassword: `${local}-new-2026` });
    expect(res.status).toBe(400);
    expect(res.body.error.fields).toEqual({ newPassword: PASSWORD_MESSAGES.personal });
  });
});

describe('each audit entry carries its session id', () => {
  it('when a person signs in and changes something, then both entries carry that session\'s id; anonymous failures carry none', async () => {
    const login = await request(t.app).post('/api/auth/login').send({ email: DEMO.admin, password: DEMO_PASSWORD });
    const c = cookieFrom(login);
    const adminId = login.body.user.id as number;
    const [row] = await t.sequelize.query<{ id: string }>('SELECT id FROM sessions WHERE user_id = :id ORDER BY created_at DESC, rowid DESC LIMIT 1', { type: QueryTypes.SELECT, replacements: { id: adminId } });
    const signIn = await AuditEntry.findOne({ where: { action: 'sign_in', actorId: adminId }, order: [['id', 'DESC']] });
    expect(signIn!.sessionId).toBe(row!.id);
    expect((await request(t.app).put('/api/settings').set('Cookie', c).send({ readingWindowPct: '4' })).status).toBe(200);
    const change = await AuditEntry.findOne({ where: { action: 'setting_change' }, order: [['id', 'DESC']] });
    expect(change!.sessionId).toBe(row!.id);
    await request(t.app).post('/api/auth/login').send({ email: 'nobody.here@harbourside.example', password: 'whatever-it-is' });
    const failed = await AuditEntry.findOne({ where: { action: 'sign_in_failed' }, order: [['id', 'DESC']] });
    expect(failed!.sessionId).toBeNull();
    const list = await request(t.app).get('/api/audit?action=setting_change').set('Cookie', c);
    expect(list.body.items[0].sessionId).toBe(row!.id);
  });
});
