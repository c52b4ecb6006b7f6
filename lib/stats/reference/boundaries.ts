// Reference implementation, kept unchanged (import paths only) to check the fast paths in lib/stats against.
/**
 * Stopping boundaries per planned look: the largest responder count that stops for futility, the
 * smallest that stops for efficacy (null: no count stops), and the smallest toxicity count that
 * triggers a safety stop. At the final look (nMax) the "futility" entry is the largest count that
 * does not meet the success rule and the "efficacy" entry the smallest count that does.
 *
 * Stopping sets are intervals (futility: counts up to a bound; efficacy: counts from a bound)
 * because both PP and the posterior probability increase with the responder count: the binomial
 * likelihood ratio is monotone in p, so the posterior (and the predictive distribution) is
 * stochastically increasing in the count for any prior. The table is read from the computed
 * statistics, count by count, not from that argument.
 */
import type { MixtureBeta, MonitoringRule, SafetyRule, SingleArmDesign, TwoArmDesign } from "../types";
import { probDifferenceExceeds } from "../difference";
import {
  monotoneThresholds,
  posteriorMixture,
  singleArmFinalSuccess,
  singleArmPredictiveTable,
  twoArmPredictiveTableAtLook,
} from "./predictive";
import {
  safetyProbabilityFromPosterior,
  singleArmMonitoringProbability,
  twoArmFinalRuleForDesign,
  validateSafety,
  validateSingleArmDesign,
  validateTwoArmDesign,
} from "../decision";
import { requireCount, StatsDomainError } from "../validate";
import { exceedsThreshold, fallsBelowThreshold } from "../compare";

/** One look of a single-arm response boundary. Counts are cumulative responders at n patients. */
export type ResponseBoundary = {
  n: number;
  /** True for the final analysis at nMax. */
  final: boolean;
  /** Largest count that stops for futility (final look: largest count without success); null when none. */
  futilityMax: number | null;
  /** Smallest count that stops for efficacy (final look: smallest count with success); null when none. */
  efficacyMin: number | null;
};

/** One look of a safety boundary: the smallest toxicity count of n that triggers a safety stop. */
export type SafetyBoundary = { n: number; toxicityMin: number | null };

export type SingleArmBoundaries = {
  looks: number[];
  response: ResponseBoundary[];
  safety: SafetyBoundary[] | null;
};

/**
 * Read a boundary row from the monitoring statistic at every count of one interim look.
 * futility if stat < futilityThreshold; efficacy if efficacy stopping and stat > efficacyThreshold.
 */
export function boundaryFromStatistics(n: number, stat: ArrayLike<number>, rule: Pick<MonitoringRule, "futilityThreshold" | "efficacyStopping" | "efficacyThreshold">): ResponseBoundary {
  let futilityMax: number | null = null;
  let efficacyMin: number | null = null;
  for (let x = 0; x <= n; x++) if (fallsBelowThreshold(stat[x], rule.futilityThreshold)) futilityMax = x;
  if (rule.efficacyStopping && rule.efficacyThreshold !== null)
    for (let x = n; x >= 0; x--) if (exceedsThreshold(stat[x], rule.efficacyThreshold)) efficacyMin = x;
  return { n, final: false, futilityMax, efficacyMin };
}

/** The final-look row from the success indicators over 0..nMax. */
export function finalBoundaryFromSuccess(success: Uint8Array): ResponseBoundary {
  const nMax = success.length - 1;
  let futilityMax: number | null = null;
  let efficacyMin: number | null = null;
  for (let x = 0; x <= nMax; x++) if (success[x] === 0) futilityMax = x;
  for (let x = nMax; x >= 0; x--) if (success[x] === 1) efficacyMin = x;
  return { n: nMax, final: true, futilityMax, efficacyMin };
}

/**
 * The interim monitoring statistic at every count of every interim look of a single-arm design:
 * PP for the predictive rule, P(p > p0 + delta | x, n) against a fixed rate, P(pE > pS + delta | x, n)
 * against an uncertain standard. `stats[k][x]` for
 * look k (interims only, final excluded).
 */
export function singleArmInterimStatistics(
  prior: MixtureBeta,
  design: Pick<SingleArmDesign, "nMax" | "p0" | "delta" | "rule">,
  interimLooks: number[],
  finalSuccess: Uint8Array,
): Float64Array[] {
  if (design.rule.kind === "predictive") return singleArmPredictiveTable(prior, interimLooks, design.nMax, finalSuccess);
  return interimLooks.map((n) => {
    const out = new Float64Array(n + 1);
    for (let x = 0; x <= n; x++) out[x] = singleArmMonitoringProbability(posteriorMixture(prior, x, n), design);
    return out;
  });
}

/**
 * Safety boundary at each look: smallest t with P(q > qmax | t of n) > thetaS, or
 * P(q > qS + margin | t of n) > thetaS for the uncertain-standard form (null when none).
 * @param safety - the safety rule (either form; thetaS in [0,1], a prior)
 * @param looks - look sizes, non-negative integers
 */
export function safetyBoundaries(safety: SafetyRule, looks: number[]): SafetyBoundary[] {
  const prior = validateSafety(safety);
  return looks.map((n) => {
    requireCount("look", n);
    let toxicityMin: number | null = null;
    for (let t = n; t >= 0; t--) if (exceedsThreshold(safetyProbabilityFromPosterior(safety, posteriorMixture(prior, t, n)), safety.thetaS)) toxicityMin = t;
    return { n, toxicityMin };
  });
}

/**
 * Boundary table of a single-arm design at its planned looks.
 * @throws StatsDomainError for an invalid design.
 */
export function singleArmBoundaries(design: SingleArmDesign): SingleArmBoundaries {
  const { prior, looks } = validateSingleArmDesign(design);
  const success = singleArmFinalSuccess(prior, design.nMax, design.p0, design.rule.thetaT);
  const interim = looks.slice(0, -1);
  const stats = singleArmInterimStatistics(prior, design, interim, success);
  const response = interim.map((n, k) => boundaryFromStatistics(n, stats[k], design.rule));
  response.push(finalBoundaryFromSuccess(success));
  return { looks, response, safety: design.safety ? safetyBoundaries(design.safety, looks) : null };
}

/**
 * One look of a two-arm boundary, per control count xC = 0..n (both arms at n patients):
 * the largest experimental count that stops for futility and the smallest that stops for
 * efficacy (final look: largest without success / smallest with success); null when none.
 */
export type TwoArmBoundary = {
  n: number;
  final: boolean;
  futilityMaxT: (number | null)[];
  efficacyMinT: (number | null)[];
};

export type TwoArmBoundaries = {
  looks: number[];
  response: TwoArmBoundary[];
  /** Safety boundary on the experimental arm's toxicity count. */
  safety: SafetyBoundary[] | null;
};

/**
 * Boundary table of a two-arm design (equal per-arm looks), for the 2-D display.
 * The predictive rule evaluates PP at every (xT, xC); the posterior rule, whose probability is
 * monotone in both counts, walks the boundary (see `monotoneThresholds`).
 */
export function twoArmBoundaries(design: TwoArmDesign): TwoArmBoundaries {
  const { priorT, priorC, looks } = validateTwoArmDesign(design);
  const N = design.nMaxPerArm;
  const rule = design.rule;
  const finalRule = twoArmFinalRuleForDesign(design);
  const response: TwoArmBoundary[] = [];
  for (const n of looks.slice(0, -1)) {
    const fut: (number | null)[] = [];
    const eff: (number | null)[] = [];
    if (rule.kind === "predictive") {
      const table = twoArmPredictiveTableAtLook(priorT, priorC, n, finalRule);
      for (let xC = 0; xC <= n; xC++) {
        const b = boundaryFromStatistics(n, table[xC], rule);
        fut.push(b.futilityMax);
        eff.push(b.efficacyMin);
      }
    } else {
      const postT: MixtureBeta[] = [];
      const postC: MixtureBeta[] = [];
      for (let x = 0; x <= n; x++) {
        postT.push(posteriorMixture(priorT, x, n));
        postC.push(posteriorMixture(priorC, x, n));
      }
      const prob = (xT: number, xC: number) => probDifferenceExceeds(postT[xT], postC[xC], design.delta);
      // Smallest xT that is not futile (P >= pL), and smallest that is efficacious (P > pU).
      const notFutile = monotoneThresholds(n, n, (xT, xC) => !fallsBelowThreshold(prob(xT, xC), rule.futilityThreshold));
      const efficacious =
        rule.efficacyStopping && rule.efficacyThreshold !== null
          ? monotoneThresholds(n, n, (xT, xC) => exceedsThreshold(prob(xT, xC), rule.efficacyThreshold as number))
          : null;
      for (let xC = 0; xC <= n; xC++) {
        fut.push(notFutile[xC] > 0 ? notFutile[xC] - 1 : null);
        eff.push(efficacious && efficacious[xC] <= n ? efficacious[xC] : null);
      }
    }
    response.push({ n, final: false, futilityMaxT: fut, efficacyMinT: eff });
  }
  const fut: (number | null)[] = [];
  const eff: (number | null)[] = [];
  for (let xC = 0; xC <= N; xC++) {
    const t = finalRule.minSuccessT[xC];
    fut.push(t > 0 ? t - 1 : null);
    eff.push(t <= N ? t : null);
  }
  response.push({ n: N, final: true, futilityMaxT: fut, efficacyMinT: eff });
  return { looks, response, safety: design.safety ? safetyBoundaries(design.safety, looks) : null };
}

/** Guard used by the recursions: a boundary row must fit its look. */
export function validateResponseBoundary(b: ResponseBoundary, prevN: number): void {
  requireCount("boundary.n", b.n);
  if (b.n <= prevN) throw new StatsDomainError("boundary.n", b.n, `must exceed the previous look ${prevN}`);
  if (b.futilityMax !== null) {
    requireCount("boundary.futilityMax", b.futilityMax);
    if (b.futilityMax > b.n) throw new StatsDomainError("boundary.futilityMax", b.futilityMax, `must not exceed n = ${b.n}`);
  }
  if (b.efficacyMin !== null) {
    requireCount("boundary.efficacyMin", b.efficacyMin);
    if (b.efficacyMin > b.n) throw new StatsDomainError("boundary.efficacyMin", b.efficacyMin, `must not exceed n = ${b.n}`);
  }
  if (b.futilityMax !== null && b.efficacyMin !== null && b.efficacyMin <= b.futilityMax)
    throw new StatsDomainError("boundary.efficacyMin", b.efficacyMin, `must exceed futilityMax = ${b.futilityMax}`);
}
