import { Router, type Request } from 'express';
import { z } from 'zod';
import { publicOrigin, type AppConfig } from '../../../config';
import type { Db } from '../../../data-access/db';
import { completeSignIn } from '../../../domain/auth/complete-sign-in';
import { recordSignOut } from '../../../domain/auth/record-sign-out';
import { AppError } from '../../../lib/app-error';
import { defineRoute } from '../access';
import { parseRequest } from '../middlewares/validate';
import { oidc, type OidcClient } from './auth-oidc';

/** Only local paths may be returned to, never another origin ("//evil.example" included). */
const returnToSchema = z
  .string()
  .max(2000)
  .regex(/^\/(?!\/|\\)[^\s]*$/, 'must be a path on this site')
  .optional();
const loginQuery = z.object({ returnTo: returnToSchema }).strict();

const promisify = (fn: (cb: (err?: unknown) => void) => void) =>
  new Promise<void>((resolve, reject) => fn((err) => (err ? reject(err) : resolve())));

const requestContext = (req: Request) => ({
  ip: req.ip,
  userAgent: req.get('user-agent')?.slice(0, 300),
});

/** A small page for browser navigations that end in a refusal (no JSON for a person to read). */
function refusalPage(title: string, message: string, signInHref: string): string {
  const esc = (s: string) => s.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);
  return `<!doctype html><html lang="en-GB"><head><meta charset="utf-8"><title>${esc(title)} · Ebbtide</title>
<link rel="icon" href="data:,"><meta name="viewport" content="width=device-width, initial-scale=1">
<style>body{font-family:'Noto Sans',system-ui,sans-serif;background:#f8fafc;color:#0f172a;margin:0}
main{max-width:32rem;margin:4rem auto;padding:2rem;background:#fff;border:1px solid #e2e8f0;border-radius:.5rem}
h1{font-size:1.25rem;color:#12454c}a{color:#1f6f7a;font-weight:600}</style></head>
<body><main><h1>${esc(title)}</h1><p>${esc(message)}</p><p><a href="${esc(signInHref)}">Back to sign-in</a></p></main></body></html>`;
}

/**
 * Browser-facing sign-in and sign-out, mounted at /auth:
 *   GET  /auth/login?returnTo=/path  redirects to the provider (code flow, PKCE, state, nonce)
 *   GET  /auth/callback              exchanges the code, regenerates the session id, signs in
 *   POST /auth/logout                ends the local session, then the provider's (RP-initiated)
 */
export function authRoutes(deps: { db: Db; config: AppConfig; oidcClient: OidcClient }): Router {
  const { db, config, oidcClient } = deps;
  const origin = publicOrigin(config);
  const redirectUri = `${origin}/auth/callback`;
  const signedOutUri = `${origin}/signed-out`;
  const router = Router();

  defineRoute(router, {
    method: 'get',
    path: '/login',
    allow: 'public',
    handler: async (req, res) => {
      const { returnTo = '/' } = parseRequest(req, 'query', loginQuery);
      const configuration = await oidcClient.configuration().catch((cause: unknown) => {
        throw new AppError(
          'provider-unreachable',
          'The sign-in service is not answering; try again shortly',
          503,
          {},
          { cause },
        );
      });
      const codeVerifier = oidc.randomPKCECodeVerifier();
      const state = oidc.randomState();
      const nonce = oidc.randomNonce();
      req.session.pendingSignIn = { codeVerifier, state, nonce, returnTo };
      await promisify((cb) => req.session.save(cb));
      const url = oidc.buildAuthorizationUrl(configuration, {
        redirect_uri: redirectUri,
        scope: config.oidcScopes,
        code_challenge: await oidc.calculatePKCECodeChallenge(codeVerifier),
        code_challenge_method: 'S256',
        state,
        nonce,
      });
      res.redirect(302, url.href);
    },
  });

  defineRoute(router, {
    method: 'get',
    path: '/callback',
    allow: 'public',
    handler: async (req, res) => {
      const pending = req.session.pendingSignIn;
      if (!pending) {
        res.redirect(303, '/sign-in?error=sign-in-expired');
        return;
      }
      const configuration = await oidcClient.configuration();
      const currentUrl = new URL(req.originalUrl, origin);
      let tokens: Awaited<ReturnType<typeof oidc.authorizationCodeGrant>>;
      try {
        tokens = await oidc.authorizationCodeGrant(configuration, currentUrl, {
          pkceCodeVerifier: pending.codeVerifier,
          expectedState: pending.state,
          expectedNonce: pending.nonce,
          idTokenExpected: true,
        });
      } catch (error) {
        req.log?.warn({ err: error }, 'sign-in callback refused');
        delete req.session.pendingSignIn;
        res.redirect(303, '/sign-in?error=sign-in-failed');
        return;
      }
      const claims = tokens.claims();
      if (!claims) throw new AppError('no-id-token', 'The provider returned no ID token', 502);
      let roles: unknown = claims[config.oidcRolesClaim];
      if (roles === undefined && tokens.access_token) {
        const info = await oidc.fetchUserInfo(configuration, tokens.access_token, claims.sub);
        roles = info[config.oidcRolesClaim];
      }
      let user;
      try {
        user = await completeSignIn(
          db,
          {
            issuer: claims.iss,
            subject: claims.sub,
            name: typeof claims.name === 'string' ? claims.name : undefined,
            email: typeof claims.email === 'string' ? claims.email : undefined,
            roles,
          },
          requestContext(req),
        );
      } catch (error) {
        if (error instanceof AppError && error.code === 'role-not-recognised') {
          await promisify((cb) => req.session.destroy(cb));
          res
            .status(403)
            .type('html')
            .send(refusalPage('No Ebbtide role', error.message, '/sign-in'));
          return;
        }
        throw error;
      }
      // A new session id at sign-in: a session id planted before sign-in is worthless after it.
      await promisify((cb) => req.session.regenerate(cb));
      req.session.userId = user.id;
      req.session.idToken = tokens.id_token ?? '';
      req.session.signedInAt = new Date().toISOString();
      await promisify((cb) => req.session.save(cb));
      res.redirect(303, pending.returnTo);
    },
  });

  defineRoute(router, {
    method: 'post',
    path: '/logout',
    allow: 'public',
    handler: async (req, res) => {
      const idToken = req.session.idToken;
      if (req.actor) await recordSignOut(db, req.actor, { ip: req.ip });
      await promisify((cb) => req.session.destroy(cb));
      res.clearCookie(config.sessionCookieName, { path: '/' });
      let redirectTo = signedOutUri;
      try {
        const configuration = await oidcClient.configuration();
        redirectTo = oidc.buildEndSessionUrl(configuration, {
          post_logout_redirect_uri: signedOutUri,
          client_id: config.oidcClientId,
          ...(idToken ? { id_token_hint: idToken } : {}),
        }).href;
      } catch (error) {
        req.log?.warn({ err: error }, 'provider sign-out unavailable; local session ended');
      }
      if (req.accepts(['html', 'json']) === 'json') res.json({ redirectTo });
      else res.redirect(303, redirectTo);
    },
  });

  return router;
}
