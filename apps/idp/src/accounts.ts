import { readFileSync } from 'node:fs';
import { z } from 'zod';
import { verifyPassword } from './passwords';

const accountSchema = z.object({
  /** The stable subject (`sub`) the relying party keys its users by. */
  id: z.string().min(1),
  username: z.string().min(1),
  email: z.string().email(),
  name: z.string().min(1),
  /** The `roles` claim: pharmacist | reviewer | trainee | admin (anything else is passed through). */
  roles: z.array(z.string()),
  /** scrypt hash from src/passwords.ts (`pnpm --filter @ebbtide/idp run hash-password`). */
  passwordHash: z.string().startsWith('scrypt$'),
});
export type Account = z.infer<typeof accountSchema>;

const accountsFileSchema = z.object({
  /** true for the seeded demo accounts: refused in production. */
  demo: z.boolean(),
  /** Shown by the start command; never the password itself in this file. */
  note: z.string().optional(),
  accounts: z.array(accountSchema).min(1),
});
export type AccountsFile = z.infer<typeof accountsFileSchema>;

export function loadAccounts(file: string): AccountsFile {
  const parsed = accountsFileSchema.safeParse(JSON.parse(readFileSync(file, 'utf8')));
  if (!parsed.success) {
    throw new Error(
      `Invalid accounts file ${file}: ${parsed.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`).join('; ')}`,
    );
  }
  return parsed.data;
}

export class AccountDirectory {
  private readonly byId = new Map<string, Account>();
  private readonly byLogin = new Map<string, Account>();

  constructor(accounts: Account[]) {
    for (const a of accounts) {
      this.byId.set(a.id, a);
      this.byLogin.set(a.username.toLowerCase(), a);
      this.byLogin.set(a.email.toLowerCase(), a);
    }
  }

  findById(id: string): Account | undefined {
    return this.byId.get(id);
  }

  findByLogin(login: string): Account | undefined {
    return this.byLogin.get(login.trim().toLowerCase());
  }

  /** The account when the password matches; undefined otherwise (unknown login included). */
  async authenticate(login: string, password: string): Promise<Account | undefined> {
    const account = this.findByLogin(login);
    // Hash even for an unknown login so timing does not reveal which logins exist.
    const ok = await verifyPassword(password, account?.passwordHash ?? DUMMY_HASH);
    return account && ok ? account : undefined;
  }

  list(): Account[] {
    return [...this.byId.values()];
  }
}

const DUMMY_HASH =
  'scrypt$16384$8$1$AAAAAAAAAAAAAAAAAAAAAA==$AAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAA==';
