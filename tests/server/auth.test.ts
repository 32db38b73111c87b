// Sign-in, lockout (REQUIREMENTS PW-03: default 5 consecutive failures), inactive accounts, me/logout.
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { User } from '../../server/db/models/index.ts';
import { DEMO, DEMO_PASSWORD, expectErrorBody, makeTestApp, sessionCookie, signedInAgent, userIdByEmail, type TestApp } from './helpers/test-app.ts';

let t: TestApp;
let admin: string;
beforeAll(async () => {
  t = await makeTestApp();
  admin = await sessionCookie(t.app, DEMO.admin);
});
afterAll(() => t.close());

const login = (email: string, password: string) => request(t.app).post('/api/auth/login').send({ email, password });

describe('POST /api/auth/login', () => {
  it('when the password is right, then 200 with the user and an httpOnly, SameSite=Lax session cookie', async () => {
    const res = await login(DEMO.chemist, DEMO_PASSWORD);
    expect(res.status).toBe(200);
    expect(res.body).toEqual({
      user: { id: expect.any(Number), email: DEMO.chemist, fullName: 'Dr. Maren Tollefsen', initials: 'MT', role: 'chemist', mustChangePassword: false },
    });
    const cookie = ([] as string[]).concat(res.headers['set-cookie'] ?? []).join('\n');
    expect(cookie).toMatch(/tarebook_session=/);
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Lax/i);
    expect(cookie).not.toMatch(/Secure/); // not production
  });

  it('when the email differs in case and has spaces, then it still signs in', async () => {
    const res = await login('  Chemist@Harbourside.EXAMPLE ', DEMO_PASSWORD);
    expect(res.status).toBe(200);
  });

  it('when the password is wrong, then 401 with the generic message', async () => {
    const res = await login(DEMO.chemist2, 'wrong-password');
    expect(res.status).toBe(401);
    expect(res.body).toEqual({ error: { message: 'Email or password is not correct', code: 'invalid_credentials' } });
  });

  it('when the email is unknown, then the same 401 as a wrong password', async () => {
    const res = await login('nobody@harbourside.example', 'whatever-password');
    expect(res.status).toBe(401);
    expect(res.body).toEqual({ error: { message: 'Email or password is not correct', code: 'invalid_credentials' } });
  });

  it('when email or password is missing, then 400 with fields', async () => {
    const res = await request(t.app).post('/api/auth/login').send({});
    expect(res.status).toBe(400);
    expectErrorBody(res.body, 'validation_failed');
    expect(res.body.error.fields).toEqual({ email: 'Enter your email address', password: 'Enter your password' });
  });

  it('when a good sign-in follows failures, then the failure count resets', async () => {
    await login(DEMO.qa, 'wrong-1');
    await login(DEMO.qa, 'wrong-2');
    expect((await User.findOne({ where: { email: DEMO.qa } }))!.failedLoginCount).toBe(2);
    expect((await login(DEMO.qa, DEMO_PASSWORD)).status).toBe(200);
    const row = (await User.findOne({ where: { email: DEMO.qa } }))!;
    expect(row.failedLoginCount).toBe(0);
    expect(row.lastLoginAt).toMatch(/^\d{4}-\d\d-\d\dT\d\d:\d\d:\d\d\.\d{3}Z$/);
  });
});

describe('lockout', () => {
  it('when 5 consecutive sign-ins fail, then the 5th answers 423 and even the right password is refused until an admin unlocks', async () => {
    const email = DEMO.technician;
    for (let i = 1; i <= 4; i++) {
      const res = await login(email, `wrong-${i}`);
      expect(res.status, `attempt ${i}`).toBe(401);
    }
    const fifth = await login(email, 'wrong-5');
    expect(fifth.status).toBe(423);
    expect(fifth.body).toEqual({
      error: {
        message: 'This account is locked after repeated failed sign-ins; ask an administrator to unlock it',
        code: 'account_locked',
      },
    });
    const right = await login(email, DEMO_PASSWORD);
    expect(right.status).toBe(423);

    const id = await userIdByEmail(t.app, admin, email);
    const list = await request(t.app).get('/api/users').set('Cookie', admin);
    expect(list.body.items.find((u: { id: number }) => u.id === id)).toMatchObject({ locked: true, failedLoginCount: 5 });

    const unlock = await request(t.app).post(`/api/users/${id}/unlock`).set('Cookie', admin);
    expect(unlock.status).toBe(200);
    expect(unlock.body.user).toMatchObject({ locked: false, lockedAt: null, failedLoginCount: 0 });

    expect((await login(email, DEMO_PASSWORD)).status).toBe(200);
  });

  it('when a non-admin tries to unlock, then 403', async () => {
    const chemist = await sessionCookie(t.app, DEMO.chemist);
    const id = await userIdByEmail(t.app, admin, DEMO.technician);
    const res = await request(t.app).post(`/api/users/${id}/unlock`).set('Cookie', chemist);
    expect(res.status).toBe(403);
    expect(res.body.error).toEqual({ message: 'This needs the admin role', code: 'forbidden' });
  });
});

describe('inactive accounts', () => {
  it('when a deactivated user signs in with the right password, then 403 account_inactive', async () => {
    const res = await login(DEMO.inactive, DEMO_PASSWORD);
    expect(res.status).toBe(403);
    expectErrorBody(res.body, 'account_inactive');
  });

  it('when a deactivated user signs in with a wrong password, then the generic 401 (status is not revealed)', async () => {
    const res = await login(DEMO.inactive, 'wrong-password');
    expect(res.status).toBe(401);
  });

  it('when an admin deactivates a signed-in user, then their next request is 401 (PW-06)', async () => {
    const agent = await signedInAgent(t.app, DEMO.chemist2);
    expect((await agent.get('/api/auth/me')).status).toBe(200);
    const id = await userIdByEmail(t.app, admin, DEMO.chemist2);
    expect((await request(t.app).patch(`/api/users/${id}`).set('Cookie', admin).send({ active: false })).status).toBe(200);

    const me = await agent.get('/api/auth/me');
    expect(me.status).toBe(401);
    expectErrorBody(me.body, 'unauthenticated');
    // reactivated: signing in works again
    await request(t.app).patch(`/api/users/${id}`).set('Cookie', admin).send({ active: true });
    expect((await login(DEMO.chemist2, DEMO_PASSWORD)).status).toBe(200);
  });
});

describe('GET /api/auth/me and POST /api/auth/logout', () => {
  it('when signed out, then /me is 401', async () => {
    const res = await request(t.app).get('/api/auth/me');
    expect(res.status).toBe(401);
    expect(res.body).toEqual({ error: { message: 'Sign in to continue', code: 'unauthenticated' } });
  });

  it('when signed in, then /me returns id, email, fullName, initials, role; after logout it is 401', async () => {
    const agent = await signedInAgent(t.app, DEMO.qa);
    const me = await agent.get('/api/auth/me');
    expect(me.status).toBe(200);
    expect(me.body).toEqual({
      user: { id: expect.any(Number), email: DEMO.qa, fullName: 'Tomasz Achterberg', initials: 'TA', role: 'qa', mustChangePassword: false },
    });
    const out = await agent.post('/api/auth/logout');
    expect(out.status).toBe(204);
    expect((await agent.get('/api/auth/me')).status).toBe(401);
  });

  it('when signed out, then logout is still 204', async () => {
    expect((await request(t.app).post('/api/auth/logout')).status).toBe(204);
  });
});

describe('POST /api/users/:id/password', () => {
  it('when an admin sets a new password, then the old one stops working and the new one works', async () => {
    const id = await userIdByEmail(t.app, admin, DEMO.inactive);
    await request(t.app).patch(`/api/users/${id}`).set('Cookie', admin).send({ active: true });
    const res = await request(t.app).post(`/api/users/${id}/password`).set('Cookie', admin).send({ password: 'a-new-bench-passphrase' });
    expect(res.status).toBe(200);
    expect(res.body.user).not.toHaveProperty('passwordHash');
    expect((await login(DEMO.inactive, DEMO_PASSWORD)).status).toBe(401);
    expect((await login(DEMO.inactive, 'a-new-bench-passphrase')).status).toBe(200);
  });

  it('when the new password is too short, then 400 with fields.password', async () => {
    const id = await userIdByEmail(t.app, admin, DEMO.inactive);
    const res = await request(t.app).post(`/api/users/${id}/password`).set('Cookie', admin).send({ password: 'short' });
    expect(res.status).toBe(400);
    expect(res.body.error.fields).toEqual({ password: 'Use at least 12 characters' }); // NIST SP 800-63B §5.1.1.2 floor 8; 12 is the lab's rule
  });

  it('then no password hash is stored in plain text', async () => {
    const row = (await User.findOne({ where: { email: DEMO.inactive } }))!;
    expect(row.passwordHash).toMatch(/^\$2[aby]\$10\$/);
  });
});
