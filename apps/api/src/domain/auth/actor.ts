import type { Role } from '@ebbtide/contracts';

/**
 * The signed-in person as the domain sees them: a plain object, loaded from the users table on
 * every request (so an admin's role change is effective on the user's next request).
 * Domain functions receive it as an argument, never the request.
 */
export interface Actor {
  userId: string;
  subject: string;
  displayName: string;
  email: string | null;
  role: Role;
}
