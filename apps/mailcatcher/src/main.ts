import { z } from 'zod';
import { startMailCatcher } from './catcher';

/** The catcher's own configuration (it is a separate app from the API). */
const env = z
  .object({
    NODE_ENV: z.string().default('development'),
    MAILCATCHER_HOST: z.string().default('127.0.0.1'),
    MAILCATCHER_SMTP_PORT: z.coerce.number().int().min(0).max(65535).default(4625),
    MAILCATCHER_HTTP_PORT: z.coerce.number().int().min(0).max(65535).default(4626),
  })
  .parse(process.env);

const catcher = await startMailCatcher({
  smtpPort: env.MAILCATCHER_SMTP_PORT,
  httpPort: env.MAILCATCHER_HTTP_PORT,
  host: env.MAILCATCHER_HOST,
  nodeEnv: env.NODE_ENV,
});
console.log(
  `Mail catcher: SMTP on ${env.MAILCATCHER_HOST}:${catcher.smtpPort}, page at ${catcher.httpUrl}/`,
);

const shutdown = async () => {
  await catcher.stop();
  process.exit(0);
};
process.on('SIGINT', () => void shutdown());
process.on('SIGTERM', () => void shutdown());
