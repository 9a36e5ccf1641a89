import { randomUUID } from 'node:crypto';
import type { Server as HttpServer } from 'node:http';
import type { AddressInfo } from 'node:net';
import express from 'express';
import { simpleParser, type AddressObject, type ParsedMail } from 'mailparser';
import { SMTPServer } from 'smtp-server';
import { renderMessagesPage } from './page';

/** One message as the catcher received it. */
export interface CaughtMessage {
  id: string;
  receivedAt: string; // ISO 8601
  /** SMTP envelope: what the sender said on MAIL FROM / RCPT TO. */
  envelope: { from: string | null; to: string[] };
  messageId: string | null;
  from: string | null;
  to: string[];
  subject: string;
  text: string;
  html: string | null;
  /** Every header, lower-case names, values as text. */
  headers: Record<string, string>;
}

export interface MailCatcherOptions {
  /** SMTP port; 0 picks a free one (tests). */
  smtpPort: number;
  /** HTTP page port; 0 picks a free one. */
  httpPort: number;
  /** Loopback only by default. */
  host?: string;
  /** Defaults to process.env.NODE_ENV; the catcher refuses to start when it is "production". */
  nodeEnv?: string;
}

export interface RunningMailCatcher {
  smtpPort: number;
  httpUrl: string;
  /** A copy of every message received so far, oldest first. */
  messages: () => CaughtMessage[];
  clear: () => void;
  /** Resolves once the next message arrives (or one already matching `predicate` exists). */
  waitForMessage: (
    predicate?: (m: CaughtMessage) => boolean,
    timeoutMs?: number,
  ) => Promise<CaughtMessage>;
  stop: () => Promise<void>;
}

const MAX_MESSAGES = 500;
const MAX_SIZE_BYTES = 5 * 1024 * 1024;

function addresses(field: AddressObject | AddressObject[] | undefined): string[] {
  if (!field) return [];
  const list = Array.isArray(field) ? field : [field];
  return list.flatMap((a) => a.value.map((v) => v.address ?? v.name).filter(Boolean) as string[]);
}

function headerText(value: unknown): string {
  if (value == null) return '';
  if (typeof value === 'string') return value;
  if (value instanceof Date) return value.toISOString();
  if (Array.isArray(value)) return value.map(headerText).join(', ');
  if (typeof value === 'object' && 'text' in value)
    return String((value as { text: unknown }).text);
  if (typeof value === 'object' && 'value' in value)
    return String((value as { value: unknown }).value);
  return String(value);
}

function toCaught(
  mail: ParsedMail,
  envelope: { from: string | null; to: string[] },
): CaughtMessage {
  const headers: Record<string, string> = {};
  for (const [key, value] of mail.headers) headers[key] = headerText(value);
  return {
    id: randomUUID(),
    receivedAt: new Date().toISOString(),
    envelope,
    messageId: mail.messageId ?? null,
    from: addresses(mail.from)[0] ?? null,
    to: addresses(mail.to),
    subject: mail.subject ?? '',
    text: mail.text ?? '',
    html: typeof mail.html === 'string' ? mail.html : null,
    headers,
  };
}

/**
 * A development and test mail server: accepts every message over SMTP on loopback (no TLS, no
 * authentication), keeps the parsed messages in memory, and shows them on a small HTTP page.
 *
 * HTTP: `GET /` (the page), `GET /messages` (JSON array, oldest first), `GET /messages/:id`,
 * `DELETE /messages` (clears), `GET /health`.
 *
 * @throws Error when NODE_ENV is "production": it must never stand in for a real mail server.
 */
export async function startMailCatcher(options: MailCatcherOptions): Promise<RunningMailCatcher> {
  const nodeEnv = options.nodeEnv ?? process.env.NODE_ENV;
  if (nodeEnv === 'production') {
    throw new Error('startMailCatcher: the mail catcher is for development and tests only');
  }
  const host = options.host ?? '127.0.0.1';
  const store: CaughtMessage[] = [];
  const waiters = new Set<(m: CaughtMessage) => void>();

  const smtp = new SMTPServer({
    secure: false,
    authOptional: true,
    disabledCommands: ['AUTH', 'STARTTLS'],
    banner: 'Ebbtide development mail catcher',
    size: MAX_SIZE_BYTES,
    logger: false,
    closeTimeout: 1000,
    onData(stream, session, callback) {
      simpleParser(stream)
        .then((mail) => {
          const envelope = {
            from: session.envelope.mailFrom ? session.envelope.mailFrom.address : null,
            to: session.envelope.rcptTo.map((r) => r.address),
          };
          const message = toCaught(mail, envelope);
          store.push(message);
          if (store.length > MAX_MESSAGES) store.shift();
          for (const notify of [...waiters]) notify(message);
          callback();
        })
        .catch((err: unknown) => callback(err instanceof Error ? err : new Error(String(err))));
    },
  });
  smtp.on('error', () => {
    // Connection-level errors (a client hanging up) are not fatal for a catcher.
  });

  await new Promise<void>((resolve, reject) => {
    smtp.server.once('error', reject);
    smtp.listen(options.smtpPort, host, () => {
      smtp.server.off('error', reject);
      resolve();
    });
  });
  const smtpPort = (smtp.server.address() as AddressInfo).port;

  const app = express();
  app.disable('x-powered-by');
  app.get('/health', (_req, res) => {
    res.json({ ok: true, messages: store.length });
  });
  app.get('/messages', (_req, res) => {
    res.json(store);
  });
  app.get('/messages/:id', (req, res) => {
    const found = store.find((m) => m.id === req.params.id);
    if (!found) res.status(404).json({ code: 'not-found', message: 'No such message' });
    else res.json(found);
  });
  app.delete('/messages', (_req, res) => {
    store.length = 0;
    res.status(204).end();
  });
  app.get('/', (_req, res) => {
    res.type('html').send(renderMessagesPage(store, { smtpPort }));
  });

  let http: HttpServer;
  try {
    http = await new Promise<HttpServer>((resolve, reject) => {
      const s = app.listen(options.httpPort, host, (err?: Error) =>
        err ? reject(err) : resolve(s),
      );
      s.once('error', reject);
    });
  } catch (err) {
    await new Promise<void>((resolve) => smtp.close(() => resolve()));
    throw err;
  }
  const httpPort = (http.address() as AddressInfo).port;

  return {
    smtpPort,
    httpUrl: `http://${host}:${httpPort}`,
    messages: () => store.map((m) => structuredClone(m)),
    clear: () => {
      store.length = 0;
    },
    waitForMessage: (predicate = () => true, timeoutMs = 10_000) => {
      const existing = store.find(predicate);
      if (existing) return Promise.resolve(structuredClone(existing));
      return new Promise<CaughtMessage>((resolve, reject) => {
        const timer = setTimeout(() => {
          waiters.delete(onMessage);
          reject(new Error(`waitForMessage: no matching message within ${timeoutMs} ms`));
        }, timeoutMs);
        const onMessage = (m: CaughtMessage) => {
          if (!predicate(m)) return;
          clearTimeout(timer);
          waiters.delete(onMessage);
          resolve(structuredClone(m));
        };
        waiters.add(onMessage);
      });
    },
    stop: async () => {
      http.closeAllConnections();
      await Promise.all([
        new Promise<void>((resolve) => http.close(() => resolve())),
        new Promise<void>((resolve) => smtp.close(() => resolve())),
      ]);
    },
  };
}
