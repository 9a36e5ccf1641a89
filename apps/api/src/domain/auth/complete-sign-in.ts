import type { Db } from '../../data-access/db';
import { recordAudit } from '../../data-access/audit';
import {
  findUserBySubject,
  insertUser,
  updateUserAtSignIn,
  type UserRecord,
} from '../../data-access/users';
import { AppError } from '../../lib/app-error';
import { mapRolesClaim } from './map-roles';

export interface VerifiedIdentity {
  issuer: string;
  subject: string;
  name: string | undefined;
  email: string | undefined;
  /** The raw value of the configured roles claim. */
  roles: unknown;
}

export interface SignInContext {
  ip?: string | undefined;
  userAgent?: string | undefined;
}

/**
 * The sign-in story, after the provider has vouched for the person: map the roles claim to a role
 * (refuse when none is known), create the user at first sign-in or refresh them, and write the
 * sign-in to the audit trail in the same transaction.
 */
export async function completeSignIn(
  db: Db,
  identity: VerifiedIdentity,
  context: SignInContext,
): Promise<UserRecord> {
  const role = mapRolesClaim(identity.roles);
  const displayName = identity.name?.trim() || identity.email || identity.subject;
  if (!role) {
    await recordAudit(db, {
      actor: { subject: identity.subject, displayName },
      action: 'sign-in.refused',
      context: {
        ...context,
        reason: 'no known role in the roles claim',
        roles: identity.roles ?? null,
      },
    });
    throw new AppError(
      'role-not-recognised',
      'Your account has no Ebbtide role (pharmacist, reviewer, trainee or admin). Ask the pharmacy system administrator to assign one.',
      403,
    );
  }
  return db.transaction(async (trx) => {
    const existing = await findUserBySubject(trx, identity.issuer, identity.subject);
    const email = identity.email ?? null;
    const user = existing
      ? await updateUserAtSignIn(trx, existing.id, { displayName, email, roleFromClaim: role })
      : await insertUser(trx, {
          issuer: identity.issuer,
          subject: identity.subject,
          displayName,
          email,
          role,
        });
    await recordAudit(trx, {
      actor: { userId: user.id, subject: user.subject, displayName: user.displayName },
      action: 'sign-in',
      entityType: 'user',
      entityId: user.id,
      context: { ...context, role: user.role, firstSignIn: !existing },
    });
    return user;
  });
}
