import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { roles, type Role } from '@ebbtide/contracts';
import { listRoutes, type AccessRule } from '../src/entry-points/http/access';
import { createTestApp } from './helpers';
import { anonymousAgent, signedInAgent, type TestClient } from './support/sign-in';

const { app, db } = createTestApp();
afterAll(() => db.destroy());

const registered = listRoutes(app);
const clients = new Map<Role, TestClient>();
beforeAll(async () => {
  for (const role of roles) clients.set(role, await signedInAgent(app, role));
});

/**
 * Pinned rules for routes whose access matters most: a change to one of these must be deliberate.
 * Every other route is still checked against the rule it was registered with.
 */
const pinned: Record<string, AccessRule> = {
  'get /api/health': 'public',
  'get /api/session': 'public',
  'get /api/me': 'signed-in',
  'get /api/users': ['admin'],
  'patch /api/users/:id/role': ['admin'],
  'get /auth/login': 'public',
  'get /auth/callback': 'public',
  'post /auth/logout': 'public',
  'post /api/internal/identity-provider-events': 'public',
  // Plans, sign-off, teaching and audit.
  'post /api/courses/:courseId/plans': ['pharmacist', 'reviewer'],
  'patch /api/plans/:id': ['pharmacist', 'reviewer'],
  'post /api/plans/:id/submit': ['pharmacist', 'reviewer'],
  'post /api/plans/:id/countersign': ['reviewer'],
  'post /api/plans/:id/return': ['reviewer'],
  'post /api/plans/:id/supersede': ['pharmacist', 'reviewer'],
  'get /api/plans/:id/report.pdf': ['pharmacist', 'reviewer'],
  'get /api/reviews': ['reviewer'],
  'get /api/teaching/cases': ['pharmacist', 'reviewer', 'trainee'],
  'post /api/teaching/cases/:id/practice-plans': ['pharmacist', 'reviewer', 'trainee'],
  'post /api/teaching/cases': ['admin'],
  'get /api/audit': ['admin'],
};

/** Paths with parameters get a plausible value; the status tells us about access, not data. */
const concretePath = (path: string) => path.replace(/:[A-Za-z_]+/g, randomUUID());

function expectedFor(rule: AccessRule, who: Role | 'none'): 'allowed' | 401 | 403 {
  if (rule === 'public') return 'allowed';
  if (who === 'none') return 401;
  if (rule === 'signed-in') return 'allowed';
  return rule.includes(who) ? 'allowed' : 403;
}

describe('authorisation matrix', () => {
  it('finds the routes the app registers', () => {
    expect(registered.length).toBeGreaterThanOrEqual(Object.keys(pinned).length);
    for (const key of Object.keys(pinned)) {
      expect(registered.map((r) => `${r.method} ${r.path}`)).toContain(key);
    }
  });

  it('every registered route has an access rule (routes are added with defineRoute)', () => {
    const withoutRule = registered.filter((r) => r.rule === undefined);
    expect(withoutRule.map((r) => `${r.method.toUpperCase()} ${r.path}`)).toEqual([]);
  });

  it('pinned routes keep their rule', () => {
    for (const r of registered) {
      const pin = pinned[`${r.method} ${r.path}`];
      if (pin)
        expect({ route: `${r.method} ${r.path}`, rule: r.rule }).toEqual({
          route: `${r.method} ${r.path}`,
          rule: pin,
        });
    }
  });

  it('each route answers each role (and no session) as its rule says', async () => {
    const failures: string[] = [];
    for (const route of registered) {
      if (typeof route.rule !== 'string' && !Array.isArray(route.rule)) continue;
      if (route.path.startsWith('/^')) continue; // the client's catch-all page, not an API route
      const url = concretePath(route.path);
      for (const who of ['none', ...roles] as const) {
        // Sign-out ends the session it is sent with: give it a session of its own.
        const client =
          who === 'none'
            ? anonymousAgent(app)
            : route.path === '/auth/logout'
              ? await signedInAgent(app, who)
              : clients.get(who)!;
        const res = await client[route.method as 'get'](url).redirects(0);
        const expected = expectedFor(route.rule, who);
        // "allowed" means the access rule let it through: the handler may still refuse it on its own
        // grounds (a bad signature, a missing row, invalid input), never with not-signed-in/forbidden.
        const ok =
          expected === 'allowed'
            ? res.body?.code !== 'not-signed-in' && res.body?.code !== 'forbidden'
            : res.status === expected;
        const jsonOk =
          expected === 'allowed' ||
          res.body?.code === (expected === 401 ? 'not-signed-in' : 'forbidden');
        if (!ok || !jsonOk) {
          failures.push(
            `${route.method.toUpperCase()} ${route.path} as ${who}: expected ${expected}, got ${res.status} ${JSON.stringify(res.body)}`,
          );
        }
      }
    }
    expect(failures).toEqual([]);
  });
});
