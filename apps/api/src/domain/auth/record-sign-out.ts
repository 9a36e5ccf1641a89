import type { Db } from '../../data-access/db';
import { recordAudit } from '../../data-access/audit';
import type { Actor } from './actor';

/** Writes the sign-out to the audit trail. */
export async function recordSignOut(
  db: Db,
  actor: Actor,
  context: { ip?: string | undefined },
): Promise<void> {
  await recordAudit(db, {
    actor: { userId: actor.userId, subject: actor.subject, displayName: actor.displayName },
    action: 'sign-out',
    entityType: 'user',
    entityId: actor.userId,
    context,
  });
}
