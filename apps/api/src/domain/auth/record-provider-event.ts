import { z } from 'zod';
import type { Db } from '../../data-access/db';
import { recordAudit } from '../../data-access/audit';

/** What the local identity provider reports: a failed or throttled sign-in attempt. */
export const providerEventSchema = z
  .object({
    type: z.enum(['sign-in.failed', 'sign-in.locked']),
    login: z.string().max(320),
    accountId: z.string().max(200).nullable(),
    ip: z.string().max(100).nullable(),
    reason: z.string().max(200),
    occurredAt: z.string().datetime(),
  })
  .strict();
export type ProviderEvent = z.infer<typeof providerEventSchema>;

/** Appends a provider-reported sign-in failure to the audit trail. */
export async function recordProviderEvent(db: Db, event: ProviderEvent): Promise<void> {
  await recordAudit(db, {
    actor: { subject: event.accountId, displayName: event.login },
    action: event.type,
    context: {
      source: 'identity-provider',
      ip: event.ip,
      reason: event.reason,
      reportedAt: event.occurredAt,
    },
  });
}
