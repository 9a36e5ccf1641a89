/**
 * Signed-in supertest clients for API route tests.
 *
 *   const { app, db } = createTestApp();
 *   const pharmacist = await signedInAgent(app, 'pharmacist');
 *   await pharmacist.post('/api/patients').send({...}).expect(201);
 *   pharmacist.user.id // the users row behind the session
 *
 * What is real: a `users` row inserted through the users repository, and a session written by the
 * app's own express-session store (connect-pg-simple, table `sessions`) with a cookie signed with
 * the app's SESSION_SECRET, exactly as the sign-in callback leaves it. Every request goes through
 * the real session, actor and access middleware. What is skipped: the trip to the identity
 * provider (apps/api/test/auth-flow.test.ts covers that end to end). Requests carry the app's own
 * Origin header, so state-changing requests pass the CSRF check; use `.set('Origin', ...)` to
 * override it.
 */
import { randomBytes, randomUUID, createHmac } from 'node:crypto';
import type { Express } from 'express';
import type { Store } from 'express-session';
import request, { type Test } from 'supertest';
import type { Role } from '@ebbtide/contracts';
import { publicOrigin, type AppConfig } from '../../src/config';
import type { Db } from '../../src/data-access/db';
import { insertUser, type UserRecord } from '../../src/data-access/users';

type Method = 'get' | 'post' | 'put' | 'patch' | 'delete';

export interface TestClient {
  get: (url: string) => Test;
  post: (url: string) => Test;
  put: (url: string) => Test;
  patch: (url: string) => Test;
  delete: (url: string) => Test;
}

export interface SignedInClient extends TestClient {
  user: UserRecord;
  /** The Cookie header value, e.g. to tamper with it. */
  cookie: string;
  /** The session id in the `sessions` table. */
  sid: string;
}

interface AppLocals {
  sessionStore: Store;
  config: AppConfig;
  db: Db;
}

function locals(app: Express): AppLocals {
  const l = app.locals as Partial<AppLocals>;
  if (!l.sessionStore || !l.config || !l.db) throw new Error('not an Ebbtide app from createApp()');
  return l as AppLocals;
}

/** The value express-session puts in the cookie: "s:" + sid + "." + HMAC-SHA256 (cookie-signature). */
export function signSessionId(sid: string, secret: string): string {
  const mac = createHmac('sha256', secret).update(sid).digest('base64').replace(/=+$/, '');
  return `s:${sid}.${mac}`;
}

function client(app: Express, headers: Record<string, string>): TestClient {
  const make = (method: Method) => (url: string) => {
    let test = request(app)[method](url);
    for (const [k, v] of Object.entries(headers)) test = test.set(k, v);
    return test;
  };
  return {
    get: make('get'),
    post: make('post'),
    put: make('put'),
    patch: make('patch'),
    delete: make('delete'),
  };
}

/** A client with no session (but the app's Origin, so only the missing session matters). */
export function anonymousAgent(app: Express): TestClient {
  return client(app, { Origin: publicOrigin(locals(app).config) });
}

/** Inserts a user with this role and a real session for them; returns a client carrying its cookie. */
export async function signedInAgent(
  app: Express,
  role: Role,
  options: { displayName?: string; email?: string | null; user?: UserRecord } = {},
): Promise<SignedInClient> {
  const { sessionStore, config, db } = locals(app);
  const tag = randomBytes(4).toString('hex');
  const user =
    options.user ??
    (await insertUser(db, {
      issuer: config.oidcIssuer,
      subject: `test-${role}-${randomUUID()}`,
      displayName: options.displayName ?? `Test ${role} ${tag}`,
      email: options.email === undefined ? `${role}.${tag}@kestrelbay.example` : options.email,
      role,
    }));
  const sid = randomBytes(24).toString('base64url');
  const maxAge = config.sessionMaxAgeMinutes * 60_000;
  const sess = {
    cookie: {
      originalMaxAge: maxAge,
      expires: new Date(Date.now() + maxAge).toISOString(),
      httpOnly: true,
      secure: false,
      path: '/',
      sameSite: 'lax',
    },
    userId: user.id,
    idToken: '',
    signedInAt: new Date().toISOString(),
  };
  await new Promise<void>((resolve, reject) =>
    sessionStore.set(sid, sess as never, (err?: unknown) => (err ? reject(err) : resolve())),
  );
  const secret = config.sessionSecret.split(',')[0]!.trim();
  const cookie = `${config.sessionCookieName}=${encodeURIComponent(signSessionId(sid, secret))}`;
  const headers = { Cookie: cookie, Origin: publicOrigin(config) };
  return { ...client(app, headers), user, cookie, sid };
}
