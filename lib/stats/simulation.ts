/**
 * Seeded Monte Carlo trial simulator: a cross-check of the exact recursion, never the primary
 * number. Each simulated trial enrols patient by patient, draws each response as a Bernoulli
 * variable from a 32-bit generator (mulberry32), and asks the design's own decision at each planned
 * look (memoised per state), so the check covers the boundary table as well as the recursion.
 * The seed is recorded in the result so a run can be repeated exactly.
 *
 * jstat 1.9.6 is not used for the draws: it has no binomial sampler (jStat.binomial offers pdf and
 * cdf only), the true rates here are fixed so its Beta sampler has nothing to draw, and
 * jStat.setRandom replaces one process-wide generator, which would tie every caller's stream
 * to whichever request set it last.
 */
import type { SingleArmDesign, TwoArmDesign } from "./types";
import type { ResponseBoundary } from "./boundaries";
import { decideAtLook, validateSingleArmDesign, validateTwoArmDesign } from "./decision";
import { requireCount, requireProbability, StatsDomainError } from "./validate";

/**
 * mulberry32: a small 32-bit generator with period 2^32, ample for a few million draws.
 * @param seed - any integer; taken modulo 2^32
 * @returns a function giving uniform numbers in [0, 1)
 */
export function mulberry32(seed: number): () => number {
  if (!Number.isInteger(seed)) throw new StatsDomainError("seed", seed, "must be an integer");
  let s = seed >>> 0;
  return () => {
    s = (s + 0x6d2b79f5) >>> 0;
    let t = s;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

type SimulatedOperatingCharacteristics = {
  seed: number;
  trials: number;
  /** Per look, the fraction of trials stopping there (final look: no success / success). */
  looks: { n: number; pStopFutility: number; pStopEfficacy: number }[];
  pEarlyTermination: number;
  pDeclareSuccess: number;
  expectedSampleSize: number;
  /** Monte Carlo standard errors of the three summaries above. */
  standardErrors: { pEarlyTermination: number; pDeclareSuccess: number; expectedSampleSize: number };
};

const CONTINUE = 0;
const FUTILITY = 1;
const EFFICACY = 2;

function requireTrials(trials: number): void {
  requireCount("trials", trials);
  if (trials < 1) throw new StatsDomainError("trials", trials, "must be at least 1");
}

function summarise(
  seed: number,
  trials: number,
  looks: number[],
  fut: Float64Array,
  eff: Float64Array,
  sumN: number,
  sumN2: number,
): SimulatedOperatingCharacteristics {
  const K = looks.length;
  let early = 0;
  let success = 0;
  for (let k = 0; k < K; k++) {
    if (k < K - 1) early += fut[k] + eff[k];
    success += eff[k];
  }
  const pE = early / trials;
  const pS = success / trials;
  const mean = sumN / trials;
  const varN = Math.max(0, sumN2 / trials - mean * mean);
  return {
    seed,
    trials,
    looks: looks.map((n, k) => ({ n, pStopFutility: fut[k] / trials, pStopEfficacy: eff[k] / trials })),
    pEarlyTermination: pE,
    pDeclareSuccess: pS,
    expectedSampleSize: mean,
    standardErrors: {
      pEarlyTermination: Math.sqrt((pE * (1 - pE)) / trials),
      pDeclareSuccess: Math.sqrt((pS * (1 - pS)) / trials),
      expectedSampleSize: Math.sqrt(varN / trials),
    },
  };
}

/** Core loop: `decide(k, x)` gives CONTINUE / FUTILITY / EFFICACY at look k with x responders. */
function runSingleArm(
  looks: number[],
  p: number,
  trials: number,
  seed: number,
  decide: (k: number, x: number) => number,
): SimulatedOperatingCharacteristics {
  const rng = mulberry32(seed);
  const K = looks.length;
  const fut = new Float64Array(K);
  const eff = new Float64Array(K);
  let sumN = 0;
  let sumN2 = 0;
  for (let t = 0; t < trials; t++) {
    let x = 0;
    let n = 0;
    for (let k = 0; k < K; k++) {
      for (; n < looks[k]; n++) if (rng() < p) x++;
      const d = decide(k, x);
      if (d !== CONTINUE || k === K - 1) {
        if (d === EFFICACY) eff[k]++;
        else fut[k]++;
        sumN += n;
        sumN2 += n * n;
        break;
      }
    }
  }
  return summarise(seed, trials, looks, fut, eff, sumN, sumN2);
}

/**
 * Simulate a single-arm design at true rate p, deciding at each planned look with `decideAtLook`
 * (response rule only; safety is simulated separately, if at all).
 * @param design - a valid single-arm design
 * @param p - true response rate in [0, 1]
 * @param opts.trials - number of simulated trials, positive integer
 * @param opts.seed - integer seed, recorded in the result
 */
export function simulateSingleArmTrials(
  design: SingleArmDesign,
  p: number,
  opts: { trials: number; seed: number },
): SimulatedOperatingCharacteristics {
  const { looks } = validateSingleArmDesign(design);
  requireProbability("p", p, { closed: true });
  requireTrials(opts.trials);
  const responseOnly: SingleArmDesign = { ...design, safety: null };
  const memo = looks.map((n) => new Int8Array(n + 1).fill(-1));
  return runSingleArm(looks, p, opts.trials, opts.seed, (k, x) => {
    let d = memo[k][x];
    if (d < 0) {
      const dec = decideAtLook(responseOnly, { n: looks[k], responders: x }).decision;
      d =
        dec.action === "continue" ? CONTINUE
        : dec.action === "final" ? (dec.success ? EFFICACY : FUTILITY)
        : dec.stop === "efficacy" ? EFFICACY
        : FUTILITY;
      memo[k][x] = d;
    }
    return d;
  });
}

/** Simulate trials that follow a boundary table (as `exactOperatingCharacteristics` reads it). */
export function simulateBoundaryTable(
  boundaries: ResponseBoundary[],
  p: number,
  opts: { trials: number; seed: number },
): SimulatedOperatingCharacteristics {
  requireProbability("p", p, { closed: true });
  requireTrials(opts.trials);
  const looks = boundaries.map((b) => b.n);
  const fMax = boundaries.map((b) => b.futilityMax ?? -1);
  const eMin = boundaries.map((b) => b.efficacyMin ?? b.n + 1);
  const K = looks.length;
  return runSingleArm(looks, p, opts.trials, opts.seed, (k, x) =>
    x <= fMax[k] ? FUTILITY : x >= eMin[k] ? EFFICACY : k === K - 1 ? FUTILITY : CONTINUE,
  );
}

/**
 * Simulate a two-arm design at true rates (pT, pC): patients enter in pairs (equal allocation),
 * decisions by `decideAtLook` at each planned per-arm look. Sample sizes are per arm.
 */
export function simulateTwoArmTrials(
  design: TwoArmDesign,
  pT: number,
  pC: number,
  opts: { trials: number; seed: number },
): SimulatedOperatingCharacteristics {
  const { looks } = validateTwoArmDesign(design);
  requireProbability("pT", pT, { closed: true });
  requireProbability("pC", pC, { closed: true });
  requireTrials(opts.trials);
  const responseOnly: TwoArmDesign = { ...design, safety: null };
  const memo = looks.map((n) => new Int8Array((n + 1) * (n + 1)).fill(-1));
  const rng = mulberry32(opts.seed);
  const K = looks.length;
  const fut = new Float64Array(K);
  const eff = new Float64Array(K);
  let sumN = 0;
  let sumN2 = 0;
  for (let t = 0; t < opts.trials; t++) {
    let xT = 0;
    let xC = 0;
    let n = 0;
    for (let k = 0; k < K; k++) {
      for (; n < looks[k]; n++) {
        if (rng() < pT) xT++;
        if (rng() < pC) xC++;
      }
      const key = xC * (n + 1) + xT;
      let d = memo[k][key];
      if (d < 0) {
        const dec = decideAtLook(responseOnly, { nT: n, respondersT: xT, nC: n, respondersC: xC }).decision;
        d =
          dec.action === "continue" ? CONTINUE
          : dec.action === "final" ? (dec.success ? EFFICACY : FUTILITY)
          : dec.stop === "efficacy" ? EFFICACY
          : FUTILITY;
        memo[k][key] = d;
      }
      if (d !== CONTINUE || k === K - 1) {
        if (d === EFFICACY) eff[k]++;
        else fut[k]++;
        sumN += n;
        sumN2 += n * n;
        break;
      }
    }
  }
  return summarise(opts.seed, opts.trials, looks, fut, eff, sumN, sumN2);
}

type SimulatedSafetyAwareOperatingCharacteristics = {
  seed: number;
  trials: number;
  pEarlyFutility: number;
  pEarlyEfficacy: number;
  pSafetyStop: number;
  pDeclareSuccess: number;
  expectedSampleSize: number;
  /** Monte Carlo standard errors of the summaries above. */
  standardErrors: { pEarlyFutility: number; pEarlyEfficacy: number; pSafetyStop: number; pDeclareSuccess: number; expectedSampleSize: number };
};

/**
 * Simulate a single-arm design with its safety rule at true response rate p and toxicity rate q,
 * each patient's response and toxicity drawn independently, deciding at each planned look with
 * `decideAtLook` on the full design (safety first). A cross-check of
 * `operatingCharacteristicsWithSafety`, never the primary number.
 */
export function simulateSingleArmTrialsWithSafety(
  design: SingleArmDesign,
  p: number,
  q: number,
  opts: { trials: number; seed: number },
): SimulatedSafetyAwareOperatingCharacteristics {
  const { looks } = validateSingleArmDesign(design);
  if (!design.safety) throw new StatsDomainError("design.safety", design.safety, "is required to simulate with safety");
  requireProbability("p", p, { closed: true });
  requireProbability("q", q, { closed: true });
  requireTrials(opts.trials);
  const SAFETY = 3;
  const memo = looks.map((n) => new Int8Array((n + 1) * (n + 1)).fill(-1));
  const rng = mulberry32(opts.seed);
  const K = looks.length;
  let fut = 0;
  let eff = 0;
  let saf = 0;
  let success = 0;
  let sumN = 0;
  let sumN2 = 0;
  for (let i = 0; i < opts.trials; i++) {
    let x = 0;
    let t = 0;
    let n = 0;
    for (let k = 0; k < K; k++) {
      for (; n < looks[k]; n++) {
        if (rng() < p) x++;
        if (rng() < q) t++;
      }
      const key = t * (n + 1) + x;
      let d = memo[k][key];
      if (d < 0) {
        const dec = decideAtLook(design, { n, responders: x, toxicities: t }).decision;
        d =
          dec.action === "continue" ? CONTINUE
          : dec.action === "final" ? (dec.success ? EFFICACY : FUTILITY)
          : dec.stop === "safety" ? SAFETY
          : dec.stop === "efficacy" ? EFFICACY
          : FUTILITY;
        memo[k][key] = d;
      }
      if (d !== CONTINUE || k === K - 1) {
        const early = k < K - 1;
        if (d === SAFETY) saf++;
        else if (d === EFFICACY) {
          success++;
          if (early) eff++;
        } else if (early) fut++;
        sumN += n;
        sumN2 += n * n;
        break;
      }
    }
  }
  const T = opts.trials;
  const se = (v: number) => Math.sqrt((v * (1 - v)) / T);
  const mean = sumN / T;
  return {
    seed: opts.seed,
    trials: T,
    pEarlyFutility: fut / T,
    pEarlyEfficacy: eff / T,
    pSafetyStop: saf / T,
    pDeclareSuccess: success / T,
    expectedSampleSize: mean,
    standardErrors: {
      pEarlyFutility: se(fut / T),
      pEarlyEfficacy: se(eff / T),
      pSafetyStop: se(saf / T),
      pDeclareSuccess: se(success / T),
      expectedSampleSize: Math.sqrt(Math.max(0, sumN2 / T - mean * mean) / T),
    },
  };
}
