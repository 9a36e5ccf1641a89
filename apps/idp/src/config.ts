import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { z } from 'zod';

export const IDP_ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');

/** Development-only values; the provider refuses to start with them when NODE_ENV=production. */
export const DEV_DEFAULTS = {
  clientSecret: 'dev-only-client-secret-not-for-production',
  cookieKeys: 'dev-only-idp-cookie-key-not-for-production',
  eventSecret: 'dev-only-idp-event-secret-not-for-production',
  accountsFile: path.join(IDP_ROOT, 'accounts.dev.json'),
} as const;

const list = z
  .union([z.string(), z.array(z.string())])
  .transform((v) => (Array.isArray(v) ? v : v.split(',')).map((s) => s.trim()).filter(Boolean));

/**
 * The local identity provider's configuration, from the environment (IDP_*), validated once.
 * It stands in for the hospital's provider in development and tests only.
 */
const configSchema = z.object({
  /** NODE_ENV */
  nodeEnv: z.enum(['development', 'test', 'production']).default('development'),
  /** IDP_HOST: loopback only. */
  host: z.enum(['127.0.0.1', '::1', 'localhost']).default('127.0.0.1'),
  /** IDP_PORT: 0 picks a free port (tests); the issuer is then built from the real port. */
  port: z.coerce.number().int().min(0).max(65535).default(4611),
  /** IDP_ISSUER: defaults to http://<host>:<port>. */
  issuer: z.string().url().optional(),
  /** IDP_CLIENT_ID / IDP_CLIENT_SECRET: the one relying party (the Ebbtide API). */
  clientId: z.string().min(1).default('ebbtide-api'),
  clientSecret: z.string().min(16).default(DEV_DEFAULTS.clientSecret),
  /** IDP_REDIRECT_URIS: comma-separated; the API's PUBLIC_URL + /auth/callback. */
  redirectUris: list.default([
    'http://127.0.0.1:4610/auth/callback',
    'http://127.0.0.1:5173/auth/callback',
  ]),
  /** IDP_POST_LOGOUT_REDIRECT_URIS: where RP-initiated logout may return to. */
  postLogoutRedirectUris: list.default([
    'http://127.0.0.1:4610/signed-out',
    'http://127.0.0.1:5173/signed-out',
  ]),
  /** IDP_ACCOUNTS_FILE: JSON accounts with scrypt hashes (see accounts.dev.json). */
  accountsFile: z.string().default(DEV_DEFAULTS.accountsFile),
  /** IDP_COOKIE_KEYS: comma-separated keys signing the provider's cookies. */
  cookieKeys: list.default([DEV_DEFAULTS.cookieKeys]),
  /** IDP_JWKS_FILE: a private JWKS; when unset a fresh RSA key is generated at start. */
  jwksFile: z.string().optional(),
  /** IDP_EVENTS_URL: the API endpoint that records failed sign-ins in the audit trail. */
  eventsUrl: z.string().url().optional(),
  /** IDP_EVENT_SECRET: shared with the API (its IDP_EVENT_SECRET) to sign those reports. */
  eventSecret: z.string().min(16).default(DEV_DEFAULTS.eventSecret),
  /** IDP_THROTTLE_*: failures before slowing, before locking; lock length; delay step. */
  throttleSlowAfter: z.coerce.number().int().min(1).default(3),
  throttleLockAfter: z.coerce.number().int().min(1).default(5),
  throttleLockSeconds: z.coerce.number().int().min(1).default(60),
  throttleDelayMs: z.coerce.number().int().min(0).default(500),
  /** LOG_LEVEL */
  logLevel: z.enum(['fatal', 'error', 'warn', 'info', 'debug', 'trace', 'silent']).default('info'),
});

export type IdpConfig = z.infer<typeof configSchema>;
export type IdpConfigInput = z.input<typeof configSchema>;

const envNames: Record<keyof IdpConfig, string> = {
  nodeEnv: 'NODE_ENV',
  host: 'IDP_HOST',
  port: 'IDP_PORT',
  issuer: 'IDP_ISSUER',
  clientId: 'IDP_CLIENT_ID',
  clientSecret: 'IDP_CLIENT_SECRET',
  redirectUris: 'IDP_REDIRECT_URIS',
  postLogoutRedirectUris: 'IDP_POST_LOGOUT_REDIRECT_URIS',
  accountsFile: 'IDP_ACCOUNTS_FILE',
  cookieKeys: 'IDP_COOKIE_KEYS',
  jwksFile: 'IDP_JWKS_FILE',
  eventsUrl: 'IDP_EVENTS_URL',
  eventSecret: 'IDP_EVENT_SECRET',
  throttleSlowAfter: 'IDP_THROTTLE_SLOW_AFTER',
  throttleLockAfter: 'IDP_THROTTLE_LOCK_AFTER',
  throttleLockSeconds: 'IDP_THROTTLE_LOCK_SECONDS',
  throttleDelayMs: 'IDP_THROTTLE_DELAY_MS',
  logLevel: 'LOG_LEVEL',
};

export function loadIdpConfig(
  env: Record<string, string | undefined> = process.env,
  overrides: Partial<IdpConfigInput> = {},
): IdpConfig {
  const raw: Record<string, unknown> = {};
  for (const [key, name] of Object.entries(envNames)) {
    const value = env[name];
    if (value !== undefined && value !== '') raw[key] = value;
  }
  const parsed = configSchema.safeParse({ ...raw, ...overrides });
  if (!parsed.success) {
    const problems = parsed.error.issues
      .map((i) => `${envNames[i.path[0] as keyof IdpConfig] ?? String(i.path[0])}: ${i.message}`)
      .join('; ');
    throw new Error(`Invalid identity provider configuration: ${problems}`);
  }
  const c = parsed.data;
  if (c.nodeEnv === 'production') {
    const problems: string[] = [];
    if (c.clientSecret === DEV_DEFAULTS.clientSecret)
      problems.push('IDP_CLIENT_SECRET is the development default');
    if (c.cookieKeys.includes(DEV_DEFAULTS.cookieKeys))
      problems.push('IDP_COOKIE_KEYS is the development default');
    if (c.eventSecret === DEV_DEFAULTS.eventSecret)
      problems.push('IDP_EVENT_SECRET is the development default');
    if (c.accountsFile === DEV_DEFAULTS.accountsFile)
      problems.push('IDP_ACCOUNTS_FILE is the demo accounts file');
    if (problems.length) throw new Error(`Refusing to start in production: ${problems.join('; ')}`);
  }
  return c;
}
