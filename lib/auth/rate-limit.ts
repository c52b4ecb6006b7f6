/**
 * Password throttling (sign-in and the password asked again to sign). Failures are counted per
 * (account, address) pair and per address, in MariaDB (db/queries/sign-in-failures.ts), so every
 * web process counts the same attempts and a restart forgets nothing; the rules here are pure.
 *
 * Why not per account: a limit per account lets anyone lock a person out by typing wrong
 * passwords for them. Per pair, an attacker slows only their own guesses at that account; the
 * real user, from their own address, is not held back. The per-address limit bounds how many
 * guesses one address makes across accounts.
 */
type RateLimitRule = { maxFailures: number; windowMs: number };
type BackoffRule = { windowMs: number; freeFailures: number; baseDelayMs: number; maxDelayMs: number };

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

/**
 * Exponential back-off: after n failures in the window (n > freeFailures), the next attempt must
 * wait baseDelayMs * 2^(n - freeFailures - 1), at most maxDelayMs, counted from the latest failure.
 */
export function backoffForMs(failureTimes: readonly number[], rule: BackoffRule, now: number): number {
  const recent = failureTimes.filter((t) => t > now - rule.windowMs);
  const over = recent.length - rule.freeFailures;
  if (over <= 0) return 0;
  const delay = Math.min(rule.maxDelayMs, rule.baseDelayMs * 2 ** Math.min(over - 1, 30));
  return Math.max(0, recent[recent.length - 1] + delay - now);
}

/**
 * Three failures per pair cost nothing; after the fourth the next try waits 1 s, then 2 s, 4 s ...
 * up to 5 minutes; 30 failures per address per 15 minutes (common practice for interactive
 * sign-in, no source; the numbers are ours).
 */
export const SIGN_IN_LIMITS = {
  perPair: { windowMs: 15 * 60_000, freeFailures: 3, baseDelayMs: 1_000, maxDelayMs: 5 * 60_000 },
  perAddress: { maxFailures: 30, windowMs: 15 * 60_000 },
} as const satisfies { perPair: BackoffRule; perAddress: RateLimitRule };

export function tooManyAttemptsMessage(ms: number, what = "sign-in"): string {
  if (ms < 60_000) {
    const seconds = Math.max(1, Math.ceil(ms / 1000));
    return `Too many failed ${what} attempts. Try again in ${seconds} second${seconds === 1 ? "" : "s"}.`;
  }
  const minutes = Math.ceil(ms / 60_000);
  return `Too many failed ${what} attempts. Try again in ${minutes} minute${minutes === 1 ? "" : "s"}.`;
}
