/**
 * Sign-in throttling per (login, IP): after `slowAfter` failures each further attempt waits
 * `delayMs` × (failures − slowAfter + 1); at `lockAfter` failures the pair is locked for
 * `lockSeconds` and attempts are refused without checking the password. A success clears it.
 * Failures older than `windowSeconds` are forgotten. In memory: one provider process.
 */
export interface ThrottlePolicy {
  slowAfter: number;
  lockAfter: number;
  lockSeconds: number;
  delayMs: number;
  windowSeconds: number;
}

interface Entry {
  failures: number;
  firstAt: number;
  lockedUntil: number;
}

export class LoginThrottle {
  private readonly entries = new Map<string, Entry>();

  constructor(
    private readonly policy: ThrottlePolicy,
    private readonly now: () => number = Date.now,
  ) {}

  private key(login: string, ip: string) {
    return `${login.trim().toLowerCase()}|${ip}`;
  }

  private entry(login: string, ip: string): Entry | undefined {
    const e = this.entries.get(this.key(login, ip));
    if (
      e &&
      this.now() - e.firstAt > this.policy.windowSeconds * 1000 &&
      e.lockedUntil < this.now()
    ) {
      this.entries.delete(this.key(login, ip));
      return undefined;
    }
    return e;
  }

  /** Seconds until the pair may try again; 0 when not locked. */
  lockedFor(login: string, ip: string): number {
    const e = this.entry(login, ip);
    if (!e || e.lockedUntil <= this.now()) return 0;
    return Math.ceil((e.lockedUntil - this.now()) / 1000);
  }

  /** How long to hold the next answer back, from the failures so far. */
  delayFor(login: string, ip: string): number {
    const e = this.entry(login, ip);
    if (!e || e.failures < this.policy.slowAfter) return 0;
    return this.policy.delayMs * (e.failures - this.policy.slowAfter + 1);
  }

  /** Records a failure; returns the lock in seconds when this failure locked the pair. */
  fail(login: string, ip: string): number {
    const key = this.key(login, ip);
    const e = this.entry(login, ip) ?? { failures: 0, firstAt: this.now(), lockedUntil: 0 };
    e.failures += 1;
    let locked = 0;
    if (e.failures >= this.policy.lockAfter) {
      e.lockedUntil = this.now() + this.policy.lockSeconds * 1000;
      e.failures = 0;
      e.firstAt = this.now();
      locked = this.policy.lockSeconds;
    }
    this.entries.set(key, e);
    return locked;
  }

  succeed(login: string, ip: string): void {
    this.entries.delete(this.key(login, ip));
  }
}
