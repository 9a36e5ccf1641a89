import { afterAll, describe, expect, it } from 'vitest';
import { restrictToTeachingFor } from '../src/data-access/scope';
import { createTestApp } from './helpers';
import { anonymousAgent, signedInAgent } from './support/sign-in';

const { app, db } = createTestApp();
afterAll(() => db.destroy());

describe('GET /api/me', () => {
  it('when signed in, then it returns the user and role', async () => {
    const pharmacist = await signedInAgent(app, 'pharmacist', { displayName: 'Maren Okafor' });
    const res = await pharmacist.get('/api/me');
    expect(res.status).toBe(200);
    expect(res.body).toEqual({
      id: pharmacist.user.id,
      subject: pharmacist.user.subject,
      displayName: 'Maren Okafor',
      email: pharmacist.user.email,
      role: 'pharmacist',
    });
  });

  it('when there is no session, then it answers 401 JSON not-signed-in', async () => {
    const res = await anonymousAgent(app).get('/api/me');
    expect(res.status).toBe(401);
    expect(res.headers['content-type']).toMatch(/json/);
    expect(res.body).toEqual({ code: 'not-signed-in', message: 'Sign in to continue' });
  });

  it('when the session cookie has been tampered with, then it answers 401', async () => {
    // Arrange: a valid session, then the signed cookie with one character of the id changed
    const trainee = await signedInAgent(app, 'trainee');
    const [name, value] = trainee.cookie.split('=') as [string, string];
    const decoded = decodeURIComponent(value);
    const flipped = decoded.slice(0, 2) + (decoded[2] === 'A' ? 'B' : 'A') + decoded.slice(3);
    // Act
    const res = await anonymousAgent(app)
      .get('/api/me')
      .set('Cookie', `${name}=${encodeURIComponent(flipped)}`);
    // Assert
    expect(res.status).toBe(401);
    expect((await trainee.get('/api/me')).status).toBe(200);
  });

  it('when the session has expired, then it answers 401', async () => {
    const reviewer = await signedInAgent(app, 'reviewer');
    expect((await reviewer.get('/api/me')).status).toBe(200);
    await db('sessions')
      .where({ sid: reviewer.sid })
      .update({ expire: new Date(Date.now() - 1000) });
    expect((await reviewer.get('/api/me')).status).toBe(401);
  });
});

describe('GET /api/session', () => {
  it('when signed out, then it answers 200 with no user (the client asks this without an error)', async () => {
    const res = await anonymousAgent(app).get('/api/session');
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ user: null });
  });
});

describe('CSRF', () => {
  it('when a state-changing request comes from another origin, then it is refused with 403', async () => {
    const admin = await signedInAgent(app, 'admin');
    const target = await signedInAgent(app, 'pharmacist');
    const res = await admin
      .patch(`/api/users/${target.user.id}/role`)
      .set('Origin', 'https://evil.example')
      .send({ role: 'admin' });
    expect(res.status).toBe(403);
    expect(res.body.code).toBe('cross-origin-refused');
    expect((await db('users').where({ id: target.user.id }).first()).role).toBe('pharmacist');
  });

  it('when the browser says the request is cross-site, then it is refused even without Origin', async () => {
    const admin = await signedInAgent(app, 'admin');
    const target = await signedInAgent(app, 'pharmacist');
    const res = await admin
      .patch(`/api/users/${target.user.id}/role`)
      .unset('Origin')
      .set('Sec-Fetch-Site', 'cross-site')
      .send({ role: 'admin' });
    expect(res.status).toBe(403);
  });

  it('when sign-out is posted from another origin, then the session survives', async () => {
    const pharmacist = await signedInAgent(app, 'pharmacist');
    const res = await pharmacist.post('/auth/logout').set('Origin', 'http://127.0.0.1:9999');
    expect(res.status).toBe(403);
    expect((await pharmacist.get('/api/me')).status).toBe(200);
  });
});

describe('PATCH /api/users/:id/role', () => {
  it('when an admin changes a role, then it applies on the user’s next request and is audited', async () => {
    // Arrange
    const admin = await signedInAgent(app, 'admin');
    const person = await signedInAgent(app, 'trainee');
    expect((await person.get('/api/me')).body.role).toBe('trainee');
    // Act
    const res = await admin.patch(`/api/users/${person.user.id}/role`).send({ role: 'pharmacist' });
    // Assert
    expect(res.status).toBe(200);
    expect(res.body.user).toMatchObject({
      id: person.user.id,
      role: 'pharmacist',
      roleSource: 'admin',
    });
    expect((await person.get('/api/me')).body.role).toBe('pharmacist');
    const audit = await db('audit_events')
      .where({ action: 'user.role-change', entity_id: person.user.id })
      .first();
    expect(audit).toMatchObject({
      actor_user_id: admin.user.id,
      before: { role: 'trainee', roleSource: 'claim' },
      after: { role: 'pharmacist', roleSource: 'admin' },
    });
  });

  it('when the role is not one of the four, then it answers 400 with a field-level message', async () => {
    const admin = await signedInAgent(app, 'admin');
    const person = await signedInAgent(app, 'trainee');
    const res = await admin.patch(`/api/users/${person.user.id}/role`).send({ role: 'surgeon' });
    expect(res.status).toBe(400);
    expect(res.body.fieldErrors.role).toBeDefined();
    expect((await db('users').where({ id: person.user.id }).first()).role).toBe('trainee');
  });

  it('when an admin tries to change their own role, then it answers 409 and nothing changes', async () => {
    const admin = await signedInAgent(app, 'admin');
    const res = await admin.patch(`/api/users/${admin.user.id}/role`).send({ role: 'trainee' });
    expect(res.status).toBe(409);
    expect((await admin.get('/api/me')).body.role).toBe('admin');
  });

  it('when the user does not exist, then it answers 404', async () => {
    const admin = await signedInAgent(app, 'admin');
    const res = await admin
      .patch('/api/users/00000000-0000-4000-8000-000000000000/role')
      .send({ role: 'trainee' });
    expect(res.status).toBe(404);
  });

  it('when a pharmacist tries it, then it answers 403 JSON forbidden', async () => {
    const pharmacist = await signedInAgent(app, 'pharmacist');
    const res = await pharmacist
      .patch(`/api/users/${pharmacist.user.id}/role`)
      .send({ role: 'admin' });
    expect(res.status).toBe(403);
    expect(res.body.code).toBe('forbidden');
  });
});

describe('restrictToTeachingFor', () => {
  it('confines a trainee (and any role without clinical access) to teaching rows; clinical staff see all', async () => {
    await db.transaction(async (trx) => {
      await trx.raw(
        'create temporary table scope_probe (id int, is_teaching boolean) on commit drop',
      );
      await trx('scope_probe').insert([
        { id: 1, is_teaching: true },
        { id: 2, is_teaching: false },
      ]);
      const ids = async (role: 'trainee' | 'pharmacist' | 'reviewer' | 'admin') =>
        (
          await restrictToTeachingFor(
            { role },
            trx('scope_probe').orderBy('id'),
            'scope_probe.is_teaching',
          )
        ).map((r: { id: number }) => r.id);
      expect(await ids('trainee')).toEqual([1]);
      expect(await ids('admin')).toEqual([1]);
      expect(await ids('pharmacist')).toEqual([1, 2]);
      expect(await ids('reviewer')).toEqual([1, 2]);
    });
  });
});
