/**
 * Per-account delay between failed sign-ins (issue 10 §5): after the n-th consecutive failure for an e-mail
 * address, the next attempt for that address is answered 429 until base·2^(n−1) ms have passed (capped at
 * 60 s), without checking the password or counting toward the lockout. Someone guessing (or trying to lock an
 * account) is slowed to a few attempts a minute per account; the per-IP limit in auth.routes.ts caps one
 * address across accounts. Unknown addresses are delayed the same way, so the answer does not tell whether an
 * account exists. Kept in memory: a restart clears the delays, never the lockout (stored on the user).
 */
export const LOGIN_DELAY_CAP_MS = 60_000;

export class LoginThrottle {
  private readonly failures = new Map<string, { count: number; lastAt: number }>();

  constructor(private readonly baseMs: number, private readonly now: () => number = Date.now) {}

  private key(email: unknown): string {
    return typeof email === 'string' ? email.trim().toLowerCase() : '';
  }

  /** Milliseconds until `email` may try again (0 = now). */
  waitMs(email: unknown): number {
    if (this.baseMs <= 0) return 0;
    const f = this.failures.get(this.key(email));
    if (!f) return 0;
    const delay = Math.min(this.baseMs * 2 ** (f.count - 1), LOGIN_DELAY_CAP_MS);
    return Math.max(0, f.lastAt + delay - this.now());
  }

  failed(email: unknown): void {
    if (this.baseMs <= 0) return;
    const key = this.key(email);
    const f = this.failures.get(key);
    this.failures.set(key, { count: Math.min((f?.count ?? 0) + 1, 32), lastAt: this.now() });
    if (this.failures.size > 10_000) this.failures.delete(this.failures.keys().next().value!); // bounded memory
  }

  succeeded(email: unknown): void {
    this.failures.delete(this.key(email));
  }
}
