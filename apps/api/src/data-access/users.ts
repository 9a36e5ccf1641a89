import type { Knex } from 'knex';
import type { Role } from '@ebbtide/contracts';

export interface UserRecord {
  id: string;
  issuer: string;
  subject: string;
  displayName: string;
  email: string | null;
  role: Role;
  roleSource: 'claim' | 'admin';
  createdAt: string;
  lastSignInAt: string | null;
}

interface UserRow {
  id: string;
  issuer: string;
  subject: string;
  display_name: string;
  email: string | null;
  role: Role;
  role_source: 'claim' | 'admin';
  created_at: Date;
  updated_at: Date;
  last_sign_in_at: Date | null;
}

const toRecord = (r: UserRow): UserRecord => ({
  id: r.id,
  issuer: r.issuer,
  subject: r.subject,
  displayName: r.display_name,
  email: r.email,
  role: r.role,
  roleSource: r.role_source,
  createdAt: new Date(r.created_at).toISOString(),
  lastSignInAt: r.last_sign_in_at ? new Date(r.last_sign_in_at).toISOString() : null,
});

export async function findUserById(
  db: Knex | Knex.Transaction,
  id: string,
): Promise<UserRecord | undefined> {
  const row = await db<UserRow>('users').where({ id }).first();
  return row ? toRecord(row) : undefined;
}

export async function findUserBySubject(
  db: Knex | Knex.Transaction,
  issuer: string,
  subject: string,
): Promise<UserRecord | undefined> {
  const row = await db<UserRow>('users').where({ issuer, subject }).first();
  return row ? toRecord(row) : undefined;
}

export async function insertUser(
  db: Knex | Knex.Transaction,
  user: {
    issuer: string;
    subject: string;
    displayName: string;
    email: string | null;
    role: Role;
  },
): Promise<UserRecord> {
  const [row] = await db<UserRow>('users')
    .insert({
      issuer: user.issuer,
      subject: user.subject,
      display_name: user.displayName,
      email: user.email,
      role: user.role,
      role_source: 'claim',
      last_sign_in_at: new Date(),
    })
    .returning('*');
  return toRecord(row as UserRow);
}

/** Refreshes name and e-mail from the provider at sign-in; the role only while it follows the claim. */
export async function updateUserAtSignIn(
  db: Knex | Knex.Transaction,
  id: string,
  changes: { displayName: string; email: string | null; roleFromClaim: Role },
): Promise<UserRecord> {
  const [row] = await db<UserRow>('users')
    .where({ id })
    .update({
      display_name: changes.displayName,
      email: changes.email,
      role: db.raw("case when role_source = 'claim' then ? else role end", [
        changes.roleFromClaim,
      ]) as unknown as Role,
      last_sign_in_at: new Date(),
      updated_at: new Date(),
    })
    .returning('*');
  return toRecord(row as UserRow);
}

/** An admin's change of role; from then on sign-ins no longer overwrite it. */
export async function setUserRole(
  db: Knex | Knex.Transaction,
  id: string,
  role: Role,
): Promise<UserRecord | undefined> {
  const [row] = await db<UserRow>('users')
    .where({ id })
    .update({ role, role_source: 'admin', updated_at: new Date() })
    .returning('*');
  return row ? toRecord(row as UserRow) : undefined;
}

export async function listUsers(db: Knex): Promise<UserRecord[]> {
  const rows = await db<UserRow>('users').orderBy('display_name');
  return rows.map(toRecord);
}
