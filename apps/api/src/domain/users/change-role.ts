import type { Role } from '@ebbtide/contracts';
import type { Db } from '../../data-access/db';
import { recordAudit } from '../../data-access/audit';
import { findUserById, setUserRole, type UserRecord } from '../../data-access/users';
import type { Actor } from '../auth/actor';
import { AppError, notFound } from '../../lib/app-error';

/**
 * An admin changes a user's role. Effective on that user's next request (the actor is re-read
 * from the users table on every request); later sign-ins no longer overwrite it from the claim.
 * An admin cannot change their own role, so the last admin cannot lock everyone out by accident.
 */
export async function changeUserRole(
  db: Db,
  actor: Actor,
  userId: string,
  role: Role,
): Promise<UserRecord> {
  if (userId === actor.userId) {
    throw new AppError('own-role', 'You cannot change your own role; ask another admin', 409, {
      fieldErrors: { role: ['You cannot change your own role'] },
    });
  }
  return db.transaction(async (trx) => {
    const before = await findUserById(trx, userId);
    if (!before) throw notFound('User');
    const after = await setUserRole(trx, userId, role);
    if (!after) throw notFound('User');
    await recordAudit(trx, {
      actor: { userId: actor.userId, subject: actor.subject, displayName: actor.displayName },
      action: 'user.role-change',
      entityType: 'user',
      entityId: userId,
      before: { role: before.role, roleSource: before.roleSource },
      after: { role: after.role, roleSource: after.roleSource },
    });
    return after;
  });
}
