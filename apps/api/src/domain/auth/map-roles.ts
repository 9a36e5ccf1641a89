import { roleSchema, type Role } from '@ebbtide/contracts';

/** When the claim carries several roles, the most capable one wins. */
export const ROLE_PRECEDENCE: readonly Role[] = ['admin', 'reviewer', 'pharmacist', 'trainee'];

/**
 * Maps the provider's `roles` claim (a string, a space/comma-separated string, or an array) to one
 * Ebbtide role by precedence admin > reviewer > pharmacist > trainee. Unknown values are ignored;
 * null when no value is a known role (the sign-in is then refused with 403).
 */
export function mapRolesClaim(claim: unknown): Role | null {
  const values: string[] = Array.isArray(claim)
    ? claim.filter((v): v is string => typeof v === 'string')
    : typeof claim === 'string'
      ? claim.split(/[\s,]+/)
      : [];
  const known = new Set(
    values
      .map((v) => roleSchema.safeParse(v.trim().toLowerCase()))
      .flatMap((r) => (r.success ? [r.data] : [])),
  );
  return ROLE_PRECEDENCE.find((role) => known.has(role)) ?? null;
}
