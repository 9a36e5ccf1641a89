import { z } from 'zod';

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
});

export type AppConfig = z.infer<typeof configSchema>;

const envNames: Record<keyof AppConfig, string> = {
  nodeEnv: 'NODE_ENV',
  host: 'API_HOST',
  port: 'API_PORT',
  databaseUrl: 'DATABASE_URL',
  logLevel: 'LOG_LEVEL',
  webDist: 'WEB_DIST',
};

/** Reads and validates the configuration; throws listing every bad key. */
export function loadConfig(
  env: Record<string, string | undefined> = process.env,
  overrides: Partial<AppConfig> = {},
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
  return parsed.data;
}
