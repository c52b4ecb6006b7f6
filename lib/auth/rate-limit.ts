/**
 * Sign-in throttling: failed attempts counted per account and per client address in a sliding
 * window. The failures are kept in MariaDB (db/queries/sign-in-failures.ts) so that every web
 * process counts the same attempts and a restart forgets nothing; the rule itself is pure.
 */
export type RateLimitRule = { maxFailures: number; windowMs: number };

/**
 * Milliseconds until another attempt is allowed (0 when allowed now), given the times of the
 * failures still in the window, oldest first: after maxFailures of them, the next attempt waits
 * until the oldest of the last maxFailures leaves the window.
 */
export function blockedForMs(failureTimes: readonly number[], rule: RateLimitRule, now: number): number {
  const recent = failureTimes.filter((t) => t > now - rule.windowMs);
  if (recent.length < rule.maxFailures) return 0;
  return Math.max(0, recent[recent.length - rule.maxFailures] + rule.windowMs - now);
}

export const SIGN_IN_LIMITS = {
  perAccount: { maxFailures: 5, windowMs: 15 * 60_000 },
  perAddress: { maxFailures: 30, windowMs: 15 * 60_000 },
} as const;

export function tooManyAttemptsMessage(ms: number): string {
  const minutes = Math.max(1, Math.ceil(ms / 60_000));
  return `Too many failed sign-in attempts. Try again in ${minutes} minute${minutes === 1 ? "" : "s"}.`;
}
