import type { Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { createApp } from './app';
import { loadConfig, type AppConfig } from './config';
import { createDb } from './data-access/db';
import { createLogger } from './lib/logger';

export interface RunningServer {
  url: string;
  port: number;
  stop: () => Promise<void>;
}

/** Validates config, builds the app and listens (port 0 picks a free port). */
export async function startServer(overrides: Partial<AppConfig> = {}): Promise<RunningServer> {
  const config = loadConfig(process.env, overrides);
  const logger = createLogger(config);
  const db = createDb(config.databaseUrl);
  const app = createApp({ config, db, logger });
  const server: Server = await new Promise((resolve, reject) => {
    const s = app.listen(config.port, config.host, () => resolve(s));
    s.on('error', reject);
  });
  const { port } = server.address() as AddressInfo;
  const url = `http://${config.host}:${port}`;
  logger.info({ url }, 'Ebbtide API listening');
  return {
    url,
    port,
    stop: async () => {
      await new Promise<void>((resolve) => server.close(() => resolve()));
      await db.destroy();
    },
  };
}
