import { createHmac } from 'node:crypto';
import type { Logger } from 'pino';

export interface SignInFailure {
  type: 'sign-in.failed' | 'sign-in.locked';
  login: string;
  accountId: string | null;
  ip: string | null;
  reason: string;
  occurredAt: string;
}

/**
 * Reports failed sign-ins to the API's audit trail (the provider has no database access):
 * POST to IDP_EVENTS_URL with `x-ebbtide-signature: t=<unix>,v1=<HMAC-SHA256(secret, t.body)>`.
 * Best effort: a failure to report is logged, never shown to the person signing in.
 */
export function createReporter(opts: { url: string | undefined; secret: string; logger: Logger }) {
  return async (event: SignInFailure): Promise<void> => {
    opts.logger.warn({ event }, 'sign-in failure');
    if (!opts.url) return;
    const body = JSON.stringify(event);
    const t = Math.floor(Date.now() / 1000);
    const v1 = createHmac('sha256', opts.secret).update(`${t}.${body}`).digest('hex');
    try {
      const res = await fetch(opts.url, {
        method: 'POST',
        headers: { 'content-type': 'application/json', 'x-ebbtide-signature': `t=${t},v1=${v1}` },
        body,
        signal: AbortSignal.timeout(5000),
      });
      if (!res.ok)
        opts.logger.error({ status: res.status }, 'the API refused a sign-in failure report');
    } catch (err) {
      opts.logger.error({ err }, 'could not report a sign-in failure to the API');
    }
  };
}
