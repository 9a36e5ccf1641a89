import { execFileSync } from 'node:child_process';
import { existsSync, statSync } from 'node:fs';
import { createServer, type Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import path from 'node:path';
import { pino } from 'pino';
import { loadAccounts } from './accounts';
import { IDP_ROOT, loadIdpConfig, type IdpConfigInput } from './config';
import { createIdpApp, STYLES_FILE } from './provider';

export interface RunningIdp {
  issuer: string;
  port: number;
  stop: () => Promise<void>;
}

/** Builds the provider's Tailwind CSS into dist/ (git-ignored) when missing or stale. */
export function ensureStyles(): void {
  const source = path.join(IDP_ROOT, 'src', 'styles.css');
  const views = path.join(IDP_ROOT, 'src', 'views.ts');
  const newest = Math.max(statSync(source).mtimeMs, statSync(views).mtimeMs);
  if (existsSync(STYLES_FILE) && statSync(STYLES_FILE).mtimeMs >= newest) return;
  execFileSync(
    path.join(IDP_ROOT, 'node_modules', '.bin', 'tailwindcss'),
    ['-i', source, '-o', STYLES_FILE, '--minify'],
    {
      cwd: IDP_ROOT,
      stdio: 'pipe',
    },
  );
}

/**
 * Starts the local provider on loopback. Listens first (port 0 picks a free port), then builds
 * the issuer from the real port. Pass `server` to use one that is already listening (tests that
 * need both the provider's and the API's ports before configuring either).
 */
export async function startIdp(
  overrides: Partial<IdpConfigInput> = {},
  options: { server?: Server } = {},
): Promise<RunningIdp> {
  const initial = loadIdpConfig(process.env, overrides);
  const accounts = loadAccounts(initial.accountsFile);
  if (initial.nodeEnv === 'production' && accounts.demo) {
    throw new Error('Refusing to start in production with demo accounts');
  }
  ensureStyles();
  const server = options.server ?? createServer();
  // Requests that arrive while the provider is still being built wait for it rather than hang.
  const current: { handler?: ReturnType<typeof createIdpApp>['app'] } = {};
  let appReady!: () => void;
  const ready = new Promise<void>((resolve) => (appReady = resolve));
  server.on('request', (req, res) => {
    if (current.handler) current.handler(req, res);
    else void ready.then(() => current.handler!(req, res));
  });
  if (!server.listening) {
    await new Promise<void>((resolve, reject) => {
      server.once('error', reject);
      server.listen(initial.port, initial.host, () => resolve());
    });
  }
  const { port } = server.address() as AddressInfo;
  const config = loadIdpConfig(process.env, { ...overrides, port });
  const host = config.host === '::1' ? '[::1]' : config.host;
  const issuer = config.issuer ?? `http://${host}:${port}`;
  const logger = pino({ level: config.logLevel, base: { service: 'ebbtide-idp' } });
  current.handler = createIdpApp({ config, issuer, accounts, logger }).app;
  appReady();
  logger.info({ issuer }, 'local identity provider listening');
  return {
    issuer,
    port,
    stop: async () => {
      server.closeAllConnections();
      await new Promise<void>((resolve) => server.close(() => resolve()));
    },
  };
}
