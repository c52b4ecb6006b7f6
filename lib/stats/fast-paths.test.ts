/**
 * The fast paths (backward recursion for PP tables, forward recursions on reusable buffers,
 * calibration sharing) against the earlier engine kept in lib/stats/reference/, on randomised
 * designs: priors (Beta, Jeffreys, informative, robust mixtures), Nmax up to 300, look schedules,
 * the three rule kinds, efficacy stopping on and off, safety rules, two arms. Agreement to 1e-12 on
 * every probability, and the same boundary tables (integers) and calibration choices.
 * The published checks stay in the other test files, which run on the fast paths.
 */
import { describe, expect, it } from "vitest";
import type { LookSchedule, MonitoringRule, PriorSpec, SafetyRule, SingleArmDesign, TwoArmDesign } from "./types";
import { resolvePrior } from "./priors";
import { expandLooks } from "./looks";
import * as fastPredictive from "./predictive";
import * as refPredictive from "./reference/predictive";
import * as fastBoundaries from "./boundaries";
import * as refBoundaries from "./reference/boundaries";
import * as fastOc from "./operating-characteristics";
import * as refOc from "./reference/operating-characteristics";
import * as fastCalibration from "./calibration";
import * as refCalibration from "./reference/calibration";
import * as fastCalibrationTwo from "./calibration-two-arm";
import * as refCalibrationTwo from "./reference/calibration-two-arm";

const TOL = 1e-12;

/** Park-Miller generator: the same designs on every run, so a failure can be replayed. */
function generator(seed: number) {
  let s = seed;
  const next = () => (s = (s * 16807) % 2147483647) / 2147483647;
  return {
    next,
    int: (lo: number, hi: number) => lo + Math.floor(next() * (hi - lo + 1)),
    pick: <T>(xs: T[]) => xs[Math.floor(next() * xs.length)],
  };
}
type Gen = ReturnType<typeof generator>;

function randomPrior(g: Gen): PriorSpec {
  const kind = g.int(0, 4);
  if (kind === 0) return { family: "uniform" };
  if (kind === 1) return { family: "jeffreys" };
  if (kind === 2) return { family: "beta", a: 0.2 + 6 * g.next(), b: 0.2 + 6 * g.next() };
  if (kind === 3) return { family: "informative", mean: 0.1 + 0.8 * g.next(), ess: 1 + 40 * g.next() };
  return { family: "robustMixture", mean: 0.1 + 0.8 * g.next(), ess: 2 + 40 * g.next(), weight: 0.2 + 0.7 * g.next() };
}

function randomLooks(g: Gen, nMax: number): LookSchedule {
  if (g.next() < 0.5) return { kind: "every", first: g.int(1, Math.max(1, Math.floor(nMax / 3))), every: g.int(1, Math.max(1, Math.floor(nMax / 8))) };
  const sizes = Array.from({ length: g.int(1, 8) }, () => g.int(1, nMax));
  return { kind: "list", sizes };
}

function randomRule(g: Gen, arms: "single" | "two"): MonitoringRule {
  const kind = g.pick(arms === "single" ? (["predictive", "posterior", "uncertainStandard"] as const) : (["predictive", "posterior"] as const));
  const futilityThreshold = kind === "predictive" ? 0.3 * g.next() : 0.4 * g.next();
  const efficacyStopping = g.next() < 0.5;
  return {
    kind,
    thetaT: 0.7 + 0.29 * g.next(),
    futilityThreshold,
    efficacyStopping,
    efficacyThreshold: efficacyStopping ? 0.9 + 0.099 * g.next() : null,
    standard: kind === "uncertainStandard" ? { a: 2 + 30 * g.next(), b: 5 + 60 * g.next() } : null,
  };
}

function randomSafety(g: Gen): SafetyRule | null {
  const r = g.next();
  if (r < 0.5) return null;
  if (r < 0.75) return { kind: "fixedLimit", qmax: 0.1 + 0.3 * g.next(), prior: { family: "beta", a: 0.5, b: 1.5 + g.next() }, thetaS: 0.8 + 0.15 * g.next() };
  return { kind: "uncertainStandard", standard: { a: 5 + 10 * g.next(), b: 20 + 40 * g.next() }, margin: 0.1 * g.next(), prior: { family: "beta", a: 0.5, b: 1.5 }, thetaS: 0.85 + 0.1 * g.next() };
}

function randomSingleArm(g: Gen, maxN: number): SingleArmDesign {
  const nMax = g.int(1, maxN);
  const p0 = 0.05 + 0.7 * g.next();
  return {
    arms: "single",
    prior: randomPrior(g),
    p0,
    p1: Math.min(0.98, p0 + 0.05 + 0.2 * g.next()),
    delta: g.next() < 0.7 ? 0 : 0.1 * g.next(),
    nMax,
    looks: randomLooks(g, nMax),
    rule: randomRule(g, "single"),
    safety: randomSafety(g),
  };
}

function randomTwoArm(g: Gen, maxN: number): TwoArmDesign {
  const N = g.int(2, maxN);
  const controlRate = 0.1 + 0.6 * g.next();
  return {
    arms: "two",
    priorT: randomPrior(g),
    priorC: randomPrior(g),
    controlRate,
    experimentalRate: Math.min(0.95, controlRate + 0.05 + 0.25 * g.next()),
    delta: g.next() < 0.6 ? 0 : -0.15 + 0.3 * g.next(),
    nMaxPerArm: N,
    looks: randomLooks(g, N),
    rule: randomRule(g, "two"),
    safety: randomSafety(g),
  };
}

function expectClose(fast: unknown, ref: unknown, path = "result"): void {
  if (typeof ref === "number") {
    expect(typeof fast, path).toBe("number");
    if (Number.isNaN(ref)) expect(Number.isNaN(fast as number), path).toBe(true);
    else expect(Math.abs((fast as number) - ref), `${path}: ${fast} vs ${ref}`).toBeLessThanOrEqual(TOL);
  } else if (ref instanceof Float64Array || Array.isArray(ref)) {
    const f = fast as ArrayLike<unknown>;
    expect(f.length, `${path}.length`).toBe((ref as ArrayLike<unknown>).length);
    for (let i = 0; i < ref.length; i++) expectClose(f[i], (ref as ArrayLike<unknown>)[i], `${path}[${i}]`);
  } else if (ref && typeof ref === "object") {
    expect(Object.keys(fast as object).sort(), path).toEqual(Object.keys(ref).sort());
    for (const [k, v] of Object.entries(ref)) expectClose((fast as Record<string, unknown>)[k], v, `${path}.${k}`);
  } else expect(fast, path).toEqual(ref);
}

describe("single-arm PP by backward recursion against the sum over future outcomes", () => {
  it("every state of random designs up to Nmax 300 agrees to 1e-12, exact 0 / 1 where the rule is settled", () => {
    const g = generator(20261204);
    for (let t = 0; t < 40; t++) {
      const prior = resolvePrior(randomPrior(g));
      const nMax = g.int(1, 300);
      const p0 = 0.05 + 0.9 * g.next();
      const thetaT = g.next() < 0.1 ? g.pick([0, 1]) : 0.5 + 0.5 * g.next();
      const success = refPredictive.singleArmFinalSuccess(prior, nMax, p0, thetaT);
      expect(Array.from(fastPredictive.singleArmFinalSuccess(prior, nMax, p0, thetaT))).toEqual(Array.from(success));
      const looks = Array.from({ length: g.int(1, 12) }, () => g.int(0, nMax));
      const fast = fastPredictive.singleArmPredictiveTable(prior, looks, nMax, success);
      const ref = refPredictive.singleArmPredictiveTable(prior, looks, nMax, success);
      expectClose(fast, ref, `design ${t}`);
      // Brute criterion for the exact values: count the successful totals reachable from (n, x).
      looks.forEach((n, k) => {
        for (let x = 0; x <= n; x++) {
          let hits = 0;
          for (let y = 0; y <= nMax - n; y++) hits += success[x + y];
          if (hits === 0) expect(fast[k][x]).toBe(0);
          if (hits === nMax - n + 1) expect(fast[k][x]).toBe(1);
        }
      });
      // One state at a time gives the table's value bit for bit.
      const k = g.int(0, looks.length - 1);
      const x = g.int(0, looks[k]);
      const one = fastPredictive.predictiveProbabilitySingleArm({ prior, x, n: looks[k], nMax, p0, thetaT, finalSuccess: success });
      expect(one).toBe(fast[k][x]);
    }
  });
});

describe("two-arm PP tables by joint backward recursion against the sum over the joint future", () => {
  it("random priors, margins and looks agree to 1e-12", () => {
    const g = generator(4242);
    for (let t = 0; t < 12; t++) {
      const priorT = resolvePrior(randomPrior(g));
      const priorC = resolvePrior(randomPrior(g));
      const N = g.int(1, 60);
      const rule = fastPredictive.twoArmFinalRule(priorT, priorC, N, -0.2 + 0.4 * g.next(), g.next() < 0.1 ? 1 : 0.5 + 0.5 * g.next());
      for (const n of [0, g.int(0, N), g.int(0, N), N]) {
        const fast = fastPredictive.twoArmPredictiveTableAtLook(priorT, priorC, n, rule);
        const ref = refPredictive.twoArmPredictiveTableAtLook(priorT, priorC, n, rule);
        expectClose(fast, ref, `design ${t} look ${n}`);
        for (let xC = 0; xC <= n; xC++)
          for (let xT = 0; xT <= n; xT++) {
            // Every joint future succeeds (worst case: no experimental and all control responders) / none does.
            if (rule.minSuccessT[xC + N - n] <= xT) expect(fast[xC][xT]).toBe(1);
            if (rule.minSuccessT[xC] > xT + N - n) expect(fast[xC][xT]).toBe(0);
          }
      }
    }
  });
});

describe("boundaries and exact operating characteristics against the reference", () => {
  it("single arm: random designs (rule kinds, efficacy on and off, safety rules), Nmax up to 300", () => {
    const g = generator(777);
    for (let t = 0; t < 40; t++) {
      const design = randomSingleArm(g, 300);
      const fast = fastBoundaries.singleArmBoundaries(design);
      const ref = refBoundaries.singleArmBoundaries(design);
      expect(fast, `design ${t}`).toEqual(ref);
      for (const p of [0, design.p0, design.p1, g.next(), 1])
        expectClose(fastOc.exactOperatingCharacteristics(fast.response, p), refOc.exactOperatingCharacteristics(ref.response, p), `design ${t} p ${p}`);
      expectClose(fastOc.typeIErrorAndPower(design), refOc.typeIErrorAndPower(design), `design ${t} error rates`);
      if (design.safety) {
        const q = [0.05, 0.2, 0.4];
        expectClose(fastOc.operatingCharacteristicsWithSafety(design, design.p1, q), refOc.operatingCharacteristicsWithSafety(design, design.p1, q), `design ${t} safety`);
      }
    }
  });

  it("single arm: look at every patient from the first, Nmax 300", () => {
    const design: SingleArmDesign = {
      arms: "single",
      prior: { family: "robustMixture", mean: 0.3, ess: 20, weight: 0.6 },
      p0: 0.2,
      p1: 0.35,
      delta: 0,
      nMax: 300,
      looks: { kind: "every", first: 1, every: 1 },
      rule: { kind: "predictive", thetaT: 0.95, futilityThreshold: 0.05, efficacyStopping: true, efficacyThreshold: 0.995 },
      safety: null,
    };
    const fast = fastBoundaries.singleArmBoundaries(design);
    const ref = refBoundaries.singleArmBoundaries(design);
    expect(fast).toEqual(ref);
    for (const p of [0.2, 0.35]) expectClose(fastOc.exactOperatingCharacteristics(fast.response, p), refOc.exactOperatingCharacteristics(ref.response, p));
  });

  it("two arms: random designs (priors, margins, rule kinds, efficacy on and off, safety), up to 120 per arm", () => {
    const g = generator(31337);
    for (let t = 0; t < 12; t++) {
      const design = randomTwoArm(g, 120);
      const fast = fastBoundaries.twoArmBoundaries(design);
      const ref = refBoundaries.twoArmBoundaries(design);
      expect(fast, `design ${t}`).toEqual(ref);
      for (const [pT, pC] of [
        [design.experimentalRate, design.controlRate],
        [g.next(), g.next()],
        [0, 1],
      ])
        expectClose(fastOc.exactTwoArmOperatingCharacteristics(fast.response, pT, pC), refOc.exactTwoArmOperatingCharacteristics(ref.response, pT, pC), `design ${t}`);
      expectClose(fastOc.twoArmTypeIErrorAndPower(design), refOc.twoArmTypeIErrorAndPower(design), `design ${t} error rates`);
      if (design.safety)
        expectClose(
          fastOc.operatingCharacteristicsWithSafety(design, [design.experimentalRate, design.controlRate], [0.1, 0.3]),
          refOc.operatingCharacteristicsWithSafety(design, [design.experimentalRate, design.controlRate], [0.1, 0.3]),
          `design ${t} safety`,
        );
    }
  });

  it("the rejections are unchanged: a boundary row that does not fit its look", () => {
    const bad = [{ n: 10, final: true, futilityMax: 11, efficacyMin: null }];
    expect(() => fastOc.exactOperatingCharacteristics(bad, 0.3)).toThrow(/futilityMax/);
    expect(() => refOc.exactOperatingCharacteristics(bad, 0.3)).toThrow(/futilityMax/);
  });
});

/**
 * Every grid value to 1e-12, and the same best designs: the same expected sample sizes in the same
 * order, each at a grid point whose reference values are its metrics. Designs whose sort keys tie
 * in exact arithmetic (no early stop possible, power 1, thresholds that differ only where no trial
 * reaches them) may come out in either order, since the last bits decide; so the thresholds are
 * checked through the grid, not compared directly.
 */
function expectSameSearch(fast: fastCalibration.CalibrationResult, ref: fastCalibration.CalibrationResult, path: string): void {
  const { best: fastBest, ...fastRest } = fast;
  const { best: refBest, ...refRest } = ref;
  expectClose(fastRest, refRest, path);
  expect(fastBest.length, `${path}.best.length`).toBe(refBest.length);
  const nL = ref.grid.thetaL.length;
  const nU = ref.grid.thetaU ? ref.grid.thetaU.length : 1;
  fastBest.forEach((d, i) => {
    const r = refBest[i];
    // The sort key; the other fields are checked at the design's own grid point below.
    expect(Math.abs(d.expectedSampleSizeNull - r.expectedSampleSizeNull), `${path}.best[${i}].expectedSampleSizeNull`).toBeLessThanOrEqual(TOL);
    const idx = (ref.grid.thetaT.indexOf(d.thetaT) * nL + ref.grid.thetaL.indexOf(d.thetaL)) * nU + (d.thetaU === null ? 0 : (ref.grid.thetaU as number[]).indexOf(d.thetaU));
    expect(Math.abs(ref.typeIError[idx] - d.typeIError), `${path}.best[${i}] at its grid point`).toBeLessThanOrEqual(TOL);
    expect(Math.abs(ref.power[idx] - d.power), `${path}.best[${i}] at its grid point`).toBeLessThanOrEqual(TOL);
    expect(Math.abs(ref.expectedSampleSizeNull[idx] - d.expectedSampleSizeNull), `${path}.best[${i}] at its grid point`).toBeLessThanOrEqual(TOL);
  });
}

describe("calibration against the reference search", () => {
  const grid = (lo: number, hi: number, k: number) => Array.from({ length: k }, (_, i) => lo + ((hi - lo) * i) / (k - 1));

  it("single arm: random designs, grids over thetaT, thetaL and (efficacy on) thetaU", () => {
    const g = generator(99);
    for (let t = 0; t < 10; t++) {
      const design = { ...randomSingleArm(g, 120), safety: null };
      const options = {
        thetaTGrid: grid(0.75, 0.99, 9),
        thetaLGrid: grid(0, 0.3, 7),
        thetaUGrid: design.rule.efficacyStopping ? grid(0.9, 0.999, 3) : null,
        typeIErrorLimit: 0.1,
        powerTarget: 0.6,
        keep: 4,
      };
      const fast = fastCalibration.calibrateSingleArm(design, options);
      const ref = refCalibration.calibrateSingleArm(design, options);
      expectSameSearch(fast, ref, `design ${t}`);
    }
  });

  it("two arms: random designs, grids over thetaT and thetaL (and thetaU with efficacy on)", () => {
    const g = generator(2026);
    for (let t = 0; t < 4; t++) {
      const design = { ...randomTwoArm(g, 40), safety: null };
      const options = {
        thetaTGrid: grid(0.8, 0.98, 4),
        thetaLGrid: grid(0, 0.2, 3),
        thetaUGrid: design.rule.efficacyStopping ? [0.97, 0.995] : null,
        typeIErrorLimit: 0.2,
        powerTarget: 0.3,
        keep: 3,
      };
      const fast = fastCalibrationTwo.calibrateTwoArm(design, options);
      const ref = refCalibrationTwo.calibrateTwoArm(design, options);
      expectSameSearch(fast, ref, `design ${t}`);
    }
  });

  it("expandLooks is shared, so both engines see the same schedule", () => {
    expect(expandLooks({ kind: "every", first: 10, every: 1 }, 200)).toHaveLength(191);
  });
});
