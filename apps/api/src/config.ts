import { z } from 'zod';

/** Development-only defaults; refused when NODE_ENV=production. */
export const DEV_DEFAULTS = {
  oidcIssuer: 'http://127.0.0.1:4611',
  oidcClientId: 'ebbtide-api',
  oidcClientSecret: 'dev-only-client-secret-not-for-production',
  sessionSecret: 'dev-only-session-secret-not-for-production-0000',
  idpEventSecret: 'dev-only-idp-event-secret-not-for-production',
} as const;

/** "true"/"false"/"1"/"0" from the environment, or a boolean from an override. */
const envBoolean = z
  .union([z.boolean(), z.enum(['true', 'false', '1', '0'])])
  .transform((v) => v === true || v === 'true' || v === '1');

function isTimeZone(zone: string): boolean {
  try {
    new Intl.DateTimeFormat('en', { timeZone: zone });
    return true;
  } catch {
    return false;
  }
}

/**
 * The API's whole configuration, read once from the environment and validated.
 * Nothing else in the API reads process.env.
 */
const configSchema = z.object({
  /** NODE_ENV: development | test | production */
  nodeEnv: z.enum(['development', 'test', 'production']).default('development'),
  /** API_HOST: the address to listen on; loopback by default. */
  host: z.string().default('127.0.0.1'),
  /** API_PORT: 0 picks a free port (tests). */
  port: z.coerce.number().int().min(0).max(65535).default(4610),
  /** DATABASE_URL: PostgreSQL connection string. */
  databaseUrl: z.string().url().default('postgres://postgres@127.0.0.1:54329/ebbtide'),
  /** LOG_LEVEL: pino level. */
  logLevel: z.enum(['fatal', 'error', 'warn', 'info', 'debug', 'trace', 'silent']).default('info'),
  /** WEB_DIST: folder of the built client, served on the same origin when present. */
  webDist: z.string().optional(),
  /**
   * PUBLIC_URL: the origin the browser uses for the app (e.g. https://ebbtide.hospital.example).
   * The OIDC redirect URI is PUBLIC_URL + /auth/callback; cookies are Secure when it is https.
   * When unset, the address the API actually listens on is used (development and tests).
   */
  publicUrl: z.string().url().optional(),
  /** CSRF_TRUSTED_ORIGINS: comma-separated extra origins allowed to send state-changing requests (e.g. the Vite dev server). */
  trustedOrigins: z
    .union([z.string(), z.array(z.string())])
    .default('http://127.0.0.1:5173,http://localhost:5173')
    .transform((s) => (Array.isArray(s) ? s : s.split(',')).map((o) => o.trim()).filter(Boolean)),
  /** OIDC_ISSUER: the identity provider's issuer URL (discovery at /.well-known/openid-configuration). */
  oidcIssuer: z.string().url().default(DEV_DEFAULTS.oidcIssuer),
  /** OIDC_CLIENT_ID: this API's client id at the provider. */
  oidcClientId: z.string().min(1).default(DEV_DEFAULTS.oidcClientId),
  /** OIDC_CLIENT_SECRET: this API's client secret (client_secret_basic). */
  oidcClientSecret: z.string().min(1).default(DEV_DEFAULTS.oidcClientSecret),
  /** OIDC_SCOPES: scopes requested at sign-in. */
  oidcScopes: z.string().default('openid profile email roles'),
  /** OIDC_ROLES_CLAIM: the claim in the ID token (or userinfo) that carries the roles. */
  oidcRolesClaim: z.string().default('roles'),
  /** SESSION_SECRET: signs the session cookie; at least 32 characters. Comma-separate to rotate (first signs). */
  sessionSecret: z.string().min(32).default(DEV_DEFAULTS.sessionSecret),
  /** SESSION_COOKIE_NAME: must differ from the provider's cookie names. */
  sessionCookieName: z.string().default('ebbtide.sid'),
  /** SESSION_MAX_AGE_MINUTES: how long a session lives after sign-in (default one 8-hour shift). */
  sessionMaxAgeMinutes: z.coerce
    .number()
    .int()
    .min(1)
    .max(60 * 24)
    .default(480),
  /**
   * SIGNING_REAUTH_MAX_AGE_MINUTES: how recently a person must have entered their credentials at
   * the identity provider to sign, countersign or return a plan (21 CFR 11.200); older than this,
   * signing asks for them again.
   */
  signingReauthMaxAgeMinutes: z.coerce.number().int().min(1).max(120).default(10),
  /** IDP_EVENT_SECRET: shared secret with which the local provider signs failed sign-in events it reports. */
  idpEventSecret: z.string().min(16).default(DEV_DEFAULTS.idpEventSecret),
  /** SMTP_HOST: the mail server; in development and tests the local mail catcher. */
  smtpHost: z.string().min(1).default('127.0.0.1'),
  /** SMTP_PORT: 4625 is the local mail catcher's development port. */
  smtpPort: z.coerce.number().int().min(1).max(65535).default(4625),
  /** SMTP_SECURE: true = TLS from the first byte (port 465); false = STARTTLS when the server offers it. */
  smtpSecure: envBoolean.default(false),
  /** SMTP_USER, SMTP_PASSWORD: optional SMTP authentication. */
  smtpUser: z.string().optional(),
  smtpPassword: z.string().optional(),
  /** MAIL_FROM: sender of every message, e.g. "Ebbtide <ebbtide@hospital.example>". */
  mailFrom: z.string().min(3).default('Ebbtide <ebbtide@kestrelbay.example>'),
  /**
   * MAIL_PATIENT_DETAIL: how much about the patient an e-mail may show (hospital policy).
   * minimal = a link only; ward = a link and the ward (default); initials = also the initials.
   * Never a name, MRN, date of birth, dose or level.
   */
  mailPatientDetail: z.enum(['minimal', 'ward', 'initials']).default('ward'),
  /**
   * RUN_WORKERS: run the background workers (mail delivery, the plan re-check sweep, PTA runs)
   * inside this API process.
   */
  runWorkers: envBoolean.default(true),
  /** HOSPITAL_TIME_ZONE: IANA zone in which mail and reports show clock times. */
  hospitalTimeZone: z
    .string()
    .default('Australia/Brisbane')
    .refine(isTimeZone, 'must be an IANA time zone, e.g. Europe/London'),
});

export type AppConfig = z.infer<typeof configSchema>;
export type AppConfigInput = z.input<typeof configSchema>;

const envNames: Record<keyof AppConfig, string> = {
  nodeEnv: 'NODE_ENV',
  host: 'API_HOST',
  port: 'API_PORT',
  databaseUrl: 'DATABASE_URL',
  logLevel: 'LOG_LEVEL',
  webDist: 'WEB_DIST',
  publicUrl: 'PUBLIC_URL',
  trustedOrigins: 'CSRF_TRUSTED_ORIGINS',
  oidcIssuer: 'OIDC_ISSUER',
  oidcClientId: 'OIDC_CLIENT_ID',
  oidcClientSecret: 'OIDC_CLIENT_SECRET',
  oidcScopes: 'OIDC_SCOPES',
  oidcRolesClaim: 'OIDC_ROLES_CLAIM',
  sessionSecret: 'SESSION_SECRET',
  sessionCookieName: 'SESSION_COOKIE_NAME',
  sessionMaxAgeMinutes: 'SESSION_MAX_AGE_MINUTES',
  signingReauthMaxAgeMinutes: 'SIGNING_REAUTH_MAX_AGE_MINUTES',
  idpEventSecret: 'IDP_EVENT_SECRET',
  smtpHost: 'SMTP_HOST',
  smtpPort: 'SMTP_PORT',
  smtpSecure: 'SMTP_SECURE',
  smtpUser: 'SMTP_USER',
  smtpPassword: 'SMTP_PASSWORD',
  mailFrom: 'MAIL_FROM',
  mailPatientDetail: 'MAIL_PATIENT_DETAIL',
  runWorkers: 'RUN_WORKERS',
  hospitalTimeZone: 'HOSPITAL_TIME_ZONE',
};

/** In production every secret must be set explicitly and the provider must not be the local one. */
function productionProblems(config: AppConfig): string[] {
  if (config.nodeEnv !== 'production') return [];
  const problems: string[] = [];
  for (const key of [
    'oidcClientSecret',
    'sessionSecret',
    'idpEventSecret',
    'oidcIssuer',
  ] as const) {
    if (config[key] === DEV_DEFAULTS[key]) {
      problems.push(`${envNames[key]}: the development default is refused in production`);
    }
  }
  if (!config.publicUrl) problems.push('PUBLIC_URL: required in production');
  else if (!config.publicUrl.startsWith('https://'))
    problems.push('PUBLIC_URL: must be https in production');
  return problems;
}

/** Reads and validates the configuration; throws listing every bad key. */
export function loadConfig(
  env: Record<string, string | undefined> = process.env,
  overrides: Partial<AppConfigInput> = {},
): AppConfig {
  const raw: Record<string, unknown> = {};
  for (const [key, name] of Object.entries(envNames)) {
    const value = env[name];
    if (value !== undefined && value !== '') raw[key] = value;
  }
  const parsed = configSchema.safeParse({ ...raw, ...overrides });
  if (!parsed.success) {
    const problems = parsed.error.issues
      .map((i) => `${envNames[i.path[0] as keyof AppConfig] ?? String(i.path[0])}: ${i.message}`)
      .join('; ');
    throw new Error(`Invalid configuration: ${problems}`);
  }
  const problems = productionProblems(parsed.data);
  if (problems.length) throw new Error(`Invalid configuration: ${problems.join('; ')}`);
  return parsed.data;
}

/** The origin the browser uses: PUBLIC_URL, or else the loopback address the API listens on. */
export function publicOrigin(config: AppConfig): string {
  return new URL(config.publicUrl ?? `http://${config.host}:${config.port}`).origin;
}
