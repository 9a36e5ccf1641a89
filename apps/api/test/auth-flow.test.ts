import knexFactory, { type Knex } from 'knex';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Role } from '@ebbtide/contracts';
import {
  DEMO_LOGINS,
  DEMO_PASSWORD,
  startProviderAndApi,
  type ProviderAndApi,
} from './support/idp';
import { ScriptedBrowser } from './support/scripted-browser';

let running: ProviderAndApi;
let db: Knex;

beforeAll(async () => {
  running = await startProviderAndApi({ idp: { throttleDelayMs: 10, throttleLockSeconds: 30 } });
  db = knexFactory({ client: 'pg', connection: process.env.DATABASE_URL });
});
afterAll(async () => {
  await running?.stop();
  await db?.destroy();
});

const SESSION_COOKIE = 'ebbtide.sid';
const waitFor = async <T>(fn: () => Promise<T | undefined>, ms = 3000): Promise<T> => {
  const until = Date.now() + ms;
  for (;;) {
    const v = await fn();
    if (v !== undefined) return v;
    if (Date.now() > until) throw new Error('timed out');
    await new Promise((r) => setTimeout(r, 50));
  }
};

describe('sign-in through the local identity provider', () => {
  it.each(Object.entries(DEMO_LOGINS) as Array<[Role, string]>)(
    'when %s signs in, then GET /api/me shows the role and sign-out ends access',
    async (role, login) => {
      // Arrange
      const browser = new ScriptedBrowser(running.api.url);
      // Act: the whole code flow (PKCE, state, nonce) through the provider's own sign-in page
      const landed = await browser.signIn(login, DEMO_PASSWORD, '/status');
      // Assert: back where we asked to return to, signed in as this role
      expect(landed.url.href).toBe(`${running.api.url}/status`);
      const me = await browser.api('GET', '/api/me');
      expect(me.status).toBe(200);
      expect(me.body).toMatchObject({ role, email: `${login}@kestrelbay.example` });
      const user = await db('users')
        .where({ subject: (me.body as { subject: string }).subject, issuer: running.idp.issuer })
        .first();
      expect(user).toMatchObject({ role, issuer: running.idp.issuer });

      // Act: sign out (local session, then the provider's, RP-initiated)
      const out = await browser.api('POST', '/auth/logout');
      expect(out.status).toBe(200);
      const endSession = new URL((out.body as { redirectTo: string }).redirectTo);
      expect(endSession.origin).toBe(running.idp.issuer);
      expect(endSession.searchParams.get('id_token_hint')).toBeTruthy();
      const confirm = await browser.follow(endSession);
      expect(confirm.body).toContain('Sign out of the hospital sign-in too?');
      const done = await browser.submitForm(confirm, { logout: 'yes' });
      // Assert: back on our signed-out page, no access, and the provider asks for a password again
      expect(done.url.href).toBe(`${running.api.url}/signed-out`);
      expect((await browser.api('GET', '/api/me')).status).toBe(401);
      const again = await browser.follow(`${running.api.url}/auth/login`);
      expect(again.body).toContain('name="password"');

      const events = await db('audit_events')
        .where({ actor_user_id: user.id })
        .orderBy('id')
        .pluck('action');
      expect(events.slice(-2)).toEqual(['sign-in', 'sign-out']);
    },
  );

  it('when the roles claim carries several roles, then the most capable one wins (reviewer over pharmacist)', async () => {
    const browser = new ScriptedBrowser(running.api.url);
    await browser.signIn(DEMO_LOGINS.reviewer, DEMO_PASSWORD);
    expect((await browser.api('GET', '/api/me')).body).toMatchObject({ role: 'reviewer' });
  });
});

describe('session fixation', () => {
  it('when a person signs in, then the session id issued before sign-in is replaced and worthless', async () => {
    // Arrange: a session id exists before sign-in (it carries the PKCE verifier and state)
    const browser = new ScriptedBrowser(running.api.url);
    const host = new URL(running.api.url).hostname;
    const page = await browser.follow(`${running.api.url}/auth/login?returnTo=/`);
    const before = browser.jar.get(SESSION_COOKIE, host);
    expect(before).toBeTruthy();
    // Act
    await browser.submitForm(page, { login: DEMO_LOGINS.pharmacist, password: DEMO_PASSWORD });
    // Assert
    const after = browser.jar.get(SESSION_COOKIE, host);
    expect(after).toBeTruthy();
    expect(after).not.toBe(before);
    expect((await browser.api('GET', '/api/me')).status).toBe(200);
    const attacker = new ScriptedBrowser(running.api.url);
    attacker.jar.set(SESSION_COOKIE, before!, host);
    expect((await attacker.api('GET', '/api/me')).status).toBe(401);
  });

  it('sets the session cookie HttpOnly and SameSite=Lax (not Secure over plain http on loopback)', async () => {
    const res = await fetch(`${running.api.url}/auth/login`, { redirect: 'manual' });
    const cookie = res.headers.getSetCookie().find((c) => c.startsWith(`${SESSION_COOKIE}=`));
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Lax/i);
    expect(cookie).not.toMatch(/Secure/i);
  });
});

describe('failed sign-in at the provider', () => {
  it('when the password is wrong, then the provider says so and the API audit trail records it', async () => {
    const browser = new ScriptedBrowser(running.api.url);
    const page = await browser.follow(`${running.api.url}/auth/login`);
    const answer = await browser.submitForm(page, {
      login: DEMO_LOGINS.trainee,
      password: 'wrong',
    });
    expect(answer.status).toBe(401);
    expect(answer.body).toContain('do not match');
    const row = await waitFor(() =>
      db('audit_events')
        .where({ action: 'sign-in.failed', actor_name: DEMO_LOGINS.trainee })
        .first(),
    );
    expect(row.context).toMatchObject({ source: 'identity-provider' });
    expect(row.actor_subject).toBe('kb-0003');
  });

  it('when bad passwords repeat, then attempts slow down and lock briefly with a clear message', async () => {
    const browser = new ScriptedBrowser(running.api.url);
    let page = await browser.follow(`${running.api.url}/auth/login`);
    const statuses: number[] = [];
    for (let i = 0; i < 5; i++) {
      page = await browser.submitForm(page, { login: DEMO_LOGINS.admin, password: `nope-${i}` });
      statuses.push(page.status);
    }
    expect(statuses).toEqual([401, 401, 401, 401, 429]);
    expect(page.body).toMatch(/Too many attempts\. Try again in \d+ seconds\./);
    // Even the right password is refused while locked.
    const locked = await browser.submitForm(page, {
      login: DEMO_LOGINS.admin,
      password: DEMO_PASSWORD,
    });
    expect(locked.status).toBe(429);
    await waitFor(() =>
      db('audit_events').where({ action: 'sign-in.locked', actor_name: DEMO_LOGINS.admin }).first(),
    );
  });

  it('when a report is not signed with the shared secret, then the API refuses it', async () => {
    const res = await fetch(`${running.api.url}/api/internal/identity-provider-events`, {
      method: 'POST',
      headers: {
        'content-type': 'application/json',
        'x-ebbtide-signature': `t=${Math.floor(Date.now() / 1000)},v1=${'0'.repeat(64)}`,
      },
      body: JSON.stringify({
        type: 'sign-in.failed',
        login: 'x',
        accountId: null,
        ip: null,
        reason: 'x',
        occurredAt: new Date().toISOString(),
      }),
    });
    expect(res.status).toBe(401);
  });
});
