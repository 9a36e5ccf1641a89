import type { Role } from '@ebbtide/contracts';
import { paths } from '../../config/paths';

/**
 * What each role may open in the client. The server enforces the same rules on every API route
 * (apps/api/src/entry-points/http/access.ts); this only hides what a role cannot use.
 */
export const CLINICAL: readonly Role[] = ['pharmacist', 'reviewer'];
export const SCREEN_ACCESS = {
  caseload: CLINICAL,
  patients: CLINICAL,
  reviews: ['reviewer'],
  teaching: ['pharmacist', 'reviewer', 'trainee'],
  drugModels: ['pharmacist', 'reviewer', 'trainee', 'admin'],
  audit: ['admin'],
  users: ['admin'],
} as const satisfies Record<string, readonly Role[]>;

export type Screen = keyof typeof SCREEN_ACCESS;

export const mayOpen = (role: Role | undefined, screen: Screen): boolean =>
  role !== undefined && (SCREEN_ACCESS[screen] as readonly Role[]).includes(role);

/** Where a role lands after sign-in when it did not ask for a page. */
export function homeFor(role: Role): string {
  if (role === 'trainee') return paths.teaching.getHref();
  if (role === 'admin') return paths.users.getHref();
  return paths.caseload.getHref();
}

export const ROLE_LABELS: Record<Role, string> = {
  pharmacist: 'Pharmacist',
  reviewer: 'Reviewing pharmacist',
  trainee: 'Trainee',
  admin: 'Administrator',
};
