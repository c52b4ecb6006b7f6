/**
 * The one place where a probability is compared with a threshold. Every rule in Cairn is a strict
 * inequality (success if P > thetaT, futility if PP < thetaL, efficacy if PP > thetaU, safety stop
 * if P > thetaS), and a probability equal to its threshold in exact arithmetic must never trigger,
 * whatever the floating-point rounding. Beta(4, 1) above 0.5 is exactly 15/16 = 0.9375 but the
 * incomplete beta returns it one rounding step high, so a bare `>` would call a tie a success.
 *
 * Rule: a value within TIE_TOLERANCE of the threshold is a tie and triggers nothing. The tolerance
 * is absolute on the probability scale (every compared quantity lies in [0, 1]) because the
 * engine's errors are absolute: the incomplete beta is good to a few thousand ulps (about 1e-12),
 * the difference quadrature to 1e-10 per pair of components, and a predictive sum to about 1e-14.
 * 1e-9 sits above all of them with room to spare and far below anything a DMC could act on: a
 * probability that beats its threshold by less than one in a billion is reported as not beating it.
 * Boundaries, decisions, operating characteristics, calibration and simulation all call these
 * helpers, so they agree with each other at every count.
 */
export const TIE_TOLERANCE = 1e-9;

/** value > threshold, with ties (|value - threshold| <= TIE_TOLERANCE) not counting. */
export function exceedsThreshold(value: number, threshold: number): boolean {
  return value - threshold > TIE_TOLERANCE;
}

/** value < threshold, with ties (|value - threshold| <= TIE_TOLERANCE) not counting. */
export function fallsBelowThreshold(value: number, threshold: number): boolean {
  return threshold - value > TIE_TOLERANCE;
}

/** True when value and threshold are within TIE_TOLERANCE: a tie, which triggers no strict rule. */
export function tiesThreshold(value: number, threshold: number): boolean {
  return Math.abs(value - threshold) <= TIE_TOLERANCE;
}
