// User administration: create, validation errors keyed by field, duplicates, deactivate (never delete).
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { userSchema } from '../../shared/schemas/users.ts';
import { DEMO, expectErrorBody, makeTestApp, sessionCookie, userIdByEmail, type TestApp } from './helpers/test-app.ts';

let t: TestApp;
let admin: string;
beforeAll(async () => {
  t = await makeTestApp();
  admin = await sessionCookie(t.app, DEMO.admin);
});
afterAll(() => t.close());

const valid = {
  email: 'Ada.Reyes@Harbourside.example',
  fullName: 'Ada Reyes',
  initials: 'ar',
  role: 'chemist',
  password: 'pipette-and-flask',
};

describe('GET /api/users', () => {
  it('when an admin lists users, then every demo user is there in the DTO shape, without password hashes', async () => {
    const res = await request(t.app).get('/api/users').set('Cookie', admin);
    expect(res.status).toBe(200);
    expect(res.body.items).toHaveLength(6);
    for (const u of res.body.items) {
      expect(userSchema.strict().safeParse(u).success, JSON.stringify(u)).toBe(true);
      expect(u.createdAt).toMatch(/^\d{4}-\d\d-\d\dT\d\d:\d\d:\d\d\.\d{3}Z$/);
    }
    expect(JSON.stringify(res.body)).not.toMatch(/\$2[aby]\$/);
  });
});

describe('POST /api/users', () => {
  it('when the input is valid, then 201; email is lower-cased and initials upper-cased; the user can sign in', async () => {
    const res = await request(t.app).post('/api/users').set('Cookie', admin).send(valid);
    expect(res.status).toBe(201);
    expect(res.body.user).toMatchObject({
      email: 'ada.reyes@harbourside.example',
      fullName: 'Ada Reyes',
      initials: 'AR',
      role: 'chemist',
      active: true,
      locked: false,
      failedLoginCount: 0,
      lastLoginAt: null,
    });
    const login = await request(t.app).post('/api/auth/login').send({ email: 'ada.reyes@harbourside.example', password: valid.password });
    expect(login.status).toBe(200);
  });

  it('when the email is already used (any case), then 409 conflict with fields.email', async () => {
    const res = await request(t.app).post('/api/users').set('Cookie', admin).send({ ...valid, email: 'CHEMIST@harbourside.example' });
    expect(res.status).toBe(409);
    expect(res.body).toEqual({
      error: {
        message: 'A user with this email address already exists',
        code: 'conflict',
        fields: { email: 'This email address is already in use' },
      },
    });
  });

  it.each([
    ['email', { email: 'not-an-email' }, 'Enter a valid email address'],
    ['password', { password: 'short' }, 'Use at least 12 characters'],
    ['role', { role: 'superuser' }, 'Choose one of: chemist, technician, qa, admin'],
    ['initials', { initials: 'A1' }, 'Use 1 to 5 letters, e.g. MT'],
    ['fullName', { fullName: '   ' }, 'Enter the full name'],
  ])('when %s is invalid, then 400 validation_failed with that field', async (field, patch, message) => {
    const res = await request(t.app).post('/api/users').set('Cookie', admin).send({ ...valid, email: 'x.y@harbourside.example', ...patch });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('validation_failed');
    expect(res.body.error.fields).toEqual({ [field]: message });
    expect(res.body.error.message).toBe(message);
  });

  it('when everything is missing, then 400 with one message per field', async () => {
    const res = await request(t.app).post('/api/users').set('Cookie', admin).send({});
    expect(res.status).toBe(400);
    expectErrorBody(res.body, 'validation_failed');
    expect(res.body.error.message).toBe('5 fields need attention');
    expect(Object.keys(res.body.error.fields).sort()).toEqual(['email', 'fullName', 'initials', 'password', 'role']);
  });

  it('when the body tries to set active/locked/passwordHash, then those keys are ignored', async () => {
    const res = await request(t.app)
      .post('/api/users')
      .set('Cookie', admin)
      .send({ ...valid, email: 'sneaky@harbourside.example', fullName: 'Bo Sneaky', initials: 'BS', active: false, lockedAt: '2020-01-01', passwordHash: 'x', id: 1 });
    expect(res.status).toBe(201);
    expect(res.body.user.active).toBe(true);
    expect(res.body.user.locked).toBe(false);
    expect(res.body.user.id).not.toBe(1);
  });
});

describe('PATCH /api/users/:id', () => {
  it('when an admin changes name, initials and role, then 200 with the new values', async () => {
    const id = await userIdByEmail(t.app, admin, 'ada.reyes@harbourside.example');
    const res = await request(t.app).patch(`/api/users/${id}`).set('Cookie', admin).send({ fullName: 'Ada M. Reyes', initials: 'amr', role: 'qa' });
    expect(res.status).toBe(200);
    expect(res.body.user).toMatchObject({ fullName: 'Ada M. Reyes', initials: 'AMR', role: 'qa' });
  });

  it('when an admin deactivates a user, then the user stays in the list as inactive and cannot sign in', async () => {
    const id = await userIdByEmail(t.app, admin, 'ada.reyes@harbourside.example');
    const res = await request(t.app).patch(`/api/users/${id}`).set('Cookie', admin).send({ active: false });
    expect(res.status).toBe(200);
    expect(res.body.user.active).toBe(false);
    const list = await request(t.app).get('/api/users').set('Cookie', admin);
    expect(list.body.items.find((u: { id: number }) => u.id === id).active).toBe(false);
    const login = await request(t.app).post('/api/auth/login').send({ email: 'ada.reyes@harbourside.example', password: valid.password });
    expect(login.status).toBe(403);
  });

  it('when an admin tries to deactivate themselves, then 409 with fields.active', async () => {
    const id = await userIdByEmail(t.app, admin, DEMO.admin);
    const res = await request(t.app).patch(`/api/users/${id}`).set('Cookie', admin).send({ active: false });
    expect(res.status).toBe(409);
    expect(res.body.error).toEqual({
      message: 'You cannot deactivate your own account',
      code: 'conflict',
      fields: { active: 'You cannot deactivate your own account' },
    });
  });

  it('when an admin tries to drop their own admin role, then 409', async () => {
    const id = await userIdByEmail(t.app, admin, DEMO.admin);
    const res = await request(t.app).patch(`/api/users/${id}`).set('Cookie', admin).send({ role: 'chemist' });
    expect(res.status).toBe(409);
    expect(res.body.error.fields).toHaveProperty('role');
  });

  it('when active is not a boolean, then 400 with fields.active', async () => {
    const id = await userIdByEmail(t.app, admin, DEMO.chemist);
    const res = await request(t.app).patch(`/api/users/${id}`).set('Cookie', admin).send({ active: 'no' });
    expect(res.status).toBe(400);
    expect(res.body.error.fields).toEqual({ active: 'Must be true or false' });
  });

  it('when the user does not exist, then 404 for patch, unlock and password', async () => {
    for (const [method, path, body] of [
      ['patch', '/api/users/99999', { fullName: 'X' }],
      ['post', '/api/users/99999/unlock', {}],
      ['post', '/api/users/99999/password', { password: 'long-enough-pass' }],
    ] as const) {
      const res = await request(t.app)[method](path).set('Cookie', admin).send(body);
      expect(res.status, path).toBe(404);
      expect(res.body.error).toEqual({ message: 'User was not found', code: 'not_found' });
    }
  });
});
