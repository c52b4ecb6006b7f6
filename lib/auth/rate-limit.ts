/**
 * Sign-in throttling: failed attempts counted per account and per client address in a sliding
 * window. Kept in the server process's memory, which suits Cairn's single-instance deployment; a
 * restart forgets the counts (documented in DEVELOPERS.md).
 */
export type RateLimitRule = { maxFailures: number; windowMs: number };

export class FailureWindow {
  private readonly failures = new Map<string, number[]>();
  constructor(
    private readonly rule: RateLimitRule,
    private readonly now: () => number = Date.now,
  ) {}

  private recent(key: string): number[] {
    const cutoff = this.now() - this.rule.windowMs;
    const list = (this.failures.get(key) ?? []).filter((t) => t > cutoff);
    if (list.length) this.failures.set(key, list);
    else this.failures.delete(key);
    return list;
  }

  /** Milliseconds until another attempt is allowed, or 0 when allowed now. */
  blockedFor(key: string): number {
    const list = this.recent(key);
    if (list.length < this.rule.maxFailures) return 0;
    return list[list.length - this.rule.maxFailures] + this.rule.windowMs - this.now();
  }

  recordFailure(key: string): void {
    const list = this.recent(key);
    list.push(this.now());
    this.failures.set(key, list);
    // Bound memory under a flood of distinct keys.
    if (this.failures.size > 50_000) this.failures.delete(this.failures.keys().next().value as string);
  }

  reset(key: string): void {
    this.failures.delete(key);
  }
}

export const SIGN_IN_LIMITS = {
  perAccount: { maxFailures: 5, windowMs: 15 * 60_000 },
  perAddress: { maxFailures: 30, windowMs: 15 * 60_000 },
} as const;

export function tooManyAttemptsMessage(ms: number): string {
  const minutes = Math.max(1, Math.ceil(ms / 60_000));
  return `Too many failed sign-in attempts. Try again in ${minutes} minute${minutes === 1 ? "" : "s"}.`;
}
