import type { Role } from '@ebbtide/contracts';
import { AppError, type FieldErrors } from '../../lib/app-error';

/** The caller as the casework domain sees it: a plain object, never a request. */
export interface CaseworkActor {
  userId: string;
  subject: string;
  displayName: string;
  role: Role;
}

/** The audit trail's view of the actor. */
export const auditActor = (a: CaseworkActor) => ({
  userId: a.userId,
  subject: a.subject,
  displayName: a.displayName,
});

/** A 400 naming the fields at fault. */
export function invalid(fieldErrors: FieldErrors, message = 'Some fields are not valid'): AppError {
  return new AppError('validation-failed', message, 400, { fieldErrors });
}

/** 409: the edit was made against an older version; nothing was overwritten. */
export function staleVersion(
  what: string,
  yourVersion: number,
  current: { version: number },
  yours: Record<string, unknown>,
): AppError {
  return new AppError(
    'stale-version',
    `This ${what} was changed by someone else (you edited version ${yourVersion}, it is now version ${current.version}). Nothing was overwritten; review the current values and try again.`,
    409,
    { yourVersion, currentVersion: current.version, current, yours },
  );
}

/** Only clinical staff write; trainees (and any other role) only read teaching cases. */
export function assertMayWrite(actor: CaseworkActor, isTeaching: boolean): void {
  if (actor.role === 'pharmacist' || actor.role === 'reviewer') return;
  throw new AppError(
    'forbidden',
    isTeaching
      ? 'Teaching cases are read-only for your role: you may open them and run the engine'
      : 'Your role does not allow this action',
    403,
  );
}

/** Rounds for display: at most `digits` significant digits, no trailing zeros. */
export function fmt(value: number, digits = 4): string {
  if (!Number.isFinite(value)) return String(value);
  if (value === 0) return '0';
  const rounded = Number(value.toPrecision(digits));
  return String(rounded);
}
