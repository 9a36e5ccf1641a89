import { generateKeyPairSync, randomUUID } from 'node:crypto';
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { createRequire } from 'node:module';
import express, { type Express } from 'express';
import Provider, { type Configuration, type KoaContextWithOIDC } from 'oidc-provider';
import type { Logger } from 'pino';
import { AccountDirectory, type AccountsFile } from './accounts';
import { IDP_ROOT, type IdpConfig } from './config';
import { createReporter } from './report';
import { LoginThrottle } from './throttle';
import { errorPage, loginPage, logoutPage, signedOutPage } from './views';

const require = createRequire(import.meta.url);
const FONT_DIR = path.join(
  path.dirname(require.resolve('@fontsource/noto-sans/package.json')),
  'files',
);
export const STYLES_FILE = path.join(IDP_ROOT, 'dist', 'styles.css');

/** A signing key made at start (node:crypto), unless IDP_JWKS_FILE gives one. */
function signingKeys(config: IdpConfig): NonNullable<Configuration['jwks']> {
  if (config.jwksFile) return JSON.parse(readFileSync(config.jwksFile, 'utf8'));
  const { privateKey } = generateKeyPairSync('rsa', { modulusLength: 2048 });
  const jwk = privateKey.export({ format: 'jwk' });
  return { keys: [{ ...jwk, kid: randomUUID(), alg: 'RS256', use: 'sig' }] } as NonNullable<
    Configuration['jwks']
  >;
}

/**
 * The local OpenID Connect provider: oidc-provider with our own interaction pages, accounts and
 * `roles` claim from configuration, consent implied for the configured client, RP-initiated logout,
 * and throttled sign-in. Grants, sessions and codes live in oidc-provider's in-memory adapter:
 * fine for one development process, lost on restart; a real deployment uses the hospital's provider.
 */
export function createIdpApp(deps: {
  config: IdpConfig;
  issuer: string;
  accounts: AccountsFile;
  logger: Logger;
}): { app: Express; provider: Provider } {
  const { config, issuer, logger } = deps;
  const directory = new AccountDirectory(deps.accounts.accounts);
  const throttle = new LoginThrottle({
    slowAfter: config.throttleSlowAfter,
    lockAfter: config.throttleLockAfter,
    lockSeconds: config.throttleLockSeconds,
    delayMs: config.throttleDelayMs,
    windowSeconds: 15 * 60,
  });
  const report = createReporter({ url: config.eventsUrl, secret: config.eventSecret, logger });
  const clientName = 'Ebbtide';

  const provider = new Provider(issuer, {
    clients: [
      {
        client_id: config.clientId,
        client_secret: config.clientSecret,
        client_name: clientName,
        redirect_uris: config.redirectUris,
        post_logout_redirect_uris: config.postLogoutRedirectUris,
        grant_types: ['authorization_code'],
        response_types: ['code'],
        token_endpoint_auth_method: 'client_secret_basic',
      },
    ],
    jwks: signingKeys(config),
    cookies: { keys: config.cookieKeys },
    pkce: { required: () => true },
    scopes: ['openid', 'profile', 'email', 'roles'],
    claims: {
      openid: ['sub'],
      profile: ['name'],
      email: ['email', 'email_verified'],
      roles: ['roles'],
    },
    // Put the scope's claims in the ID token too, so the API needs no userinfo call.
    conformIdTokenClaims: false,
    async findAccount(_ctx, sub) {
      const account = directory.findById(sub);
      if (!account) return undefined;
      return {
        accountId: account.id,
        async claims() {
          return {
            sub: account.id,
            name: account.name,
            email: account.email,
            email_verified: true,
            roles: account.roles,
          };
        },
      };
    },
    // First-party client: consent is implied, so there is no consent page.
    async loadExistingGrant(ctx: KoaContextWithOIDC) {
      const client = ctx.oidc.client;
      const session = ctx.oidc.session;
      if (!client || !session?.accountId) return undefined;
      const grantId = ctx.oidc.result?.consent?.grantId || session.grantIdFor(client.clientId);
      if (grantId) {
        const existing = await ctx.oidc.provider.Grant.find(grantId);
        if (existing) return existing;
      }
      const grant = new ctx.oidc.provider.Grant({
        clientId: client.clientId,
        accountId: session.accountId,
      });
      grant.addOIDCScope('openid profile email roles');
      await grant.save();
      session.grantIdFor(client.clientId, grant.jti);
      return grant;
    },
    interactions: { url: (_ctx, interaction) => `/interaction/${interaction.uid}` },
    features: {
      devInteractions: { enabled: false },
      rpInitiatedLogout: {
        enabled: true,
        async logoutSource(ctx, form) {
          ctx.type = 'html';
          ctx.body = logoutPage(form, ctx.host);
        },
        async postLogoutSuccessSource(ctx) {
          ctx.type = 'html';
          ctx.body = signedOutPage();
        },
      },
    },
    async renderError(ctx, out) {
      ctx.type = 'html';
      ctx.body = errorPage(String(out.error_description ?? out.error ?? 'Something went wrong'));
    },
    ttl: {
      Session: 8 * 3600,
      Interaction: 3600,
      Grant: 8 * 3600,
      AccessToken: 3600,
      IdToken: 3600,
      AuthorizationCode: 60,
    },
  });

  const app = express();
  app.disable('x-powered-by');
  app.use((_req, res, next) => {
    res.set('x-content-type-options', 'nosniff');
    res.set('x-frame-options', 'DENY');
    res.set('referrer-policy', 'no-referrer');
    next();
  });
  app.use('/assets/fonts', express.static(FONT_DIR, { maxAge: '1d' }));
  app.get('/assets/styles.css', (_req, res) => res.sendFile(STYLES_FILE));

  const noStore = (res: express.Response) => res.set('cache-control', 'no-store');

  app.get('/interaction/:uid', async (req, res, next) => {
    try {
      const details = await provider.interactionDetails(req, res);
      noStore(res);
      if (details.prompt.name === 'login') {
        res
          .type('html')
          .send(loginPage({ action: `/interaction/${details.uid}/login`, clientName }));
        return;
      }
      // Any other prompt (consent): implied for our one client.
      const grant = details.grantId
        ? await provider.Grant.find(details.grantId)
        : new provider.Grant({
            accountId: details.session?.accountId,
            clientId: String(details.params.client_id),
          });
      if (!grant) throw new Error('grant not found');
      grant.addOIDCScope(String(details.params.scope ?? 'openid'));
      const grantId = await grant.save();
      await provider.interactionFinished(
        req,
        res,
        { consent: { grantId } },
        { mergeWithLastSubmission: true },
      );
    } catch (error) {
      next(error);
    }
  });

  app.post(
    '/interaction/:uid/login',
    express.urlencoded({ extended: false, limit: '10kb' }),
    async (req, res, next) => {
      try {
        const details = await provider.interactionDetails(req, res);
        noStore(res);
        const login = String(req.body?.login ?? '').slice(0, 320);
        const password = String(req.body?.password ?? '');
        const ip = req.ip ?? 'unknown';
        const action = `/interaction/${details.uid}/login`;
        const lockedFor = throttle.lockedFor(login, ip);
        if (lockedFor > 0) {
          void report({
            type: 'sign-in.locked',
            login,
            accountId: directory.findByLogin(login)?.id ?? null,
            ip,
            reason: 'attempt while locked',
            occurredAt: new Date().toISOString(),
          });
          res
            .status(429)
            .type('html')
            .send(
              loginPage({
                action,
                clientName,
                login,
                error: `Too many attempts. Try again in ${lockedFor} seconds.`,
              }),
            );
          return;
        }
        const delay = throttle.delayFor(login, ip);
        if (delay > 0) await new Promise((r) => setTimeout(r, delay));
        const account = await directory.authenticate(login, password);
        if (!account) {
          const locked = throttle.fail(login, ip);
          void report({
            type: locked ? 'sign-in.locked' : 'sign-in.failed',
            login,
            accountId: directory.findByLogin(login)?.id ?? null,
            ip,
            reason: locked
              ? `wrong password; locked for ${locked} seconds`
              : 'wrong user name or password',
            occurredAt: new Date().toISOString(),
          });
          const error = locked
            ? `Too many attempts. Try again in ${locked} seconds.`
            : 'That user name and password do not match. Check them and try again.';
          res
            .status(locked ? 429 : 401)
            .type('html')
            .send(loginPage({ action, clientName, login, error }));
          return;
        }
        throttle.succeed(login, ip);
        await provider.interactionFinished(
          req,
          res,
          { login: { accountId: account.id } },
          { mergeWithLastSubmission: false },
        );
      } catch (error) {
        next(error);
      }
    },
  );

  app.use(provider.callback());
  app.use(((error, _req, res, _next) => {
    logger.error({ err: error }, 'identity provider error');
    res
      .status(400)
      .type('html')
      .send(
        errorPage(
          'This sign-in link has expired or is not valid. Go back to Ebbtide and sign in again.',
        ),
      );
  }) as express.ErrorRequestHandler);
  return { app, provider };
}
