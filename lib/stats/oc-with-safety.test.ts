/**
 * Finding 9: operating characteristics that include the safety rule and split early termination
 * into futility, efficacy and safety stops.
 *
 * References outside the function under test: brute-force enumeration of every patient-by-patient
 * sequence of (response, toxicity) outcomes for small designs, each walked through `decideAtLook`
 * (the decision the DMC would see, safety first); an independent two-dimensional forward recursion
 * over (responders, toxicities); the seeded simulator; and exact identities (q = 0 gives the
 * response-only characteristics; all stopping probabilities sum to one). Response and toxicity are
 * independent per patient in every reference, as in the engine.
 */
import { describe, expect, it } from "vitest";
import { decideAtLook } from "./decision";
import { safetyBoundaries, singleArmBoundaries } from "./boundaries";
import { binomialPmfs } from "./distributions";
import {
  exactOperatingCharacteristics,
  operatingCharacteristicsWithSafety,
  twoArmOperatingCharacteristics,
  type SafetyAwareOperatingCharacteristics,
} from "./operating-characteristics";
import { simulateSingleArmTrialsWithSafety } from "./simulation";
import { expandLooks } from "./looks";
import type { Design, SingleArmDesign, TwoArmDesign } from "./types";
import { StatsDomainError } from "./validate";

type Tally = { fut: number[]; eff: number[]; saf: number[]; en: number };

/** Enumerate every sequence of per-patient outcomes; `step` adds one patient (single arm) or one pair (two arms). */
function bruteForce(design: Design, outcomes: { prob: number; add: number[] }[], decide: (state: number[], n: number) => string): Tally {
  const looks = expandLooks(design.looks, design.arms === "single" ? design.nMax : design.nMaxPerArm);
  const K = looks.length;
  const tally: Tally = { fut: Array(K).fill(0), eff: Array(K).fill(0), saf: Array(K).fill(0), en: 0 };
  const walk = (n: number, state: number[], prob: number, k: number) => {
    if (n === looks[k]) {
      const d = decide(state, n);
      if (d !== "continue") {
        (d === "safety" ? tally.saf : d === "efficacy" ? tally.eff : tally.fut)[k] += prob;
        tally.en += n * prob;
        return;
      }
      k++;
    }
    for (const o of outcomes) walk(n + 1, state.map((s, i) => s + o.add[i]), prob * o.prob, k);
  };
  walk(0, outcomes[0].add.map(() => 0), 1, 0);
  return tally;
}

function decisionWord(d: ReturnType<typeof decideAtLook>["decision"]): string {
  if (d.action === "continue") return "continue";
  if (d.action === "final") return d.success ? "efficacy" : "futility";
  return d.stop;
}

function expectMatchesTally(oc: SafetyAwareOperatingCharacteristics, t: Tally, tol: number) {
  oc.looks.forEach((l, k) => {
    expect(Math.abs(l.pStopFutility - t.fut[k])).toBeLessThan(tol);
    expect(Math.abs(l.pStopEfficacy - t.eff[k])).toBeLessThan(tol);
    expect(Math.abs(l.pStopSafety - t.saf[k])).toBeLessThan(tol);
  });
  expect(Math.abs(oc.expectedSampleSize - t.en)).toBeLessThan(tol * 10);
}

const small: SingleArmDesign = {
  arms: "single",
  prior: { family: "uniform" },
  p0: 0.3,
  p1: 0.6,
  delta: 0,
  nMax: 6,
  looks: { kind: "list", sizes: [2, 4] },
  rule: { kind: "posterior", thetaT: 0.8, futilityThreshold: 0.2, efficacyStopping: true, efficacyThreshold: 0.95 },
  safety: { qmax: 0.3, prior: { family: "beta", a: 0.6, b: 1.4 }, thetaS: 0.7 },
};

function singleOutcomes(p: number, q: number) {
  return [
    { prob: (1 - p) * (1 - q), add: [0, 0] },
    { prob: p * (1 - q), add: [1, 0] },
    { prob: (1 - p) * q, add: [0, 1] },
    { prob: p * q, add: [1, 1] },
  ];
}

describe("finding 9: operating characteristics with safety", () => {
  const designs: [string, SingleArmDesign][] = [
    ["fixed-rate rule, fixed toxicity limit", small],
    ["predictive rule, fixed toxicity limit", { ...small, rule: { ...small.rule, kind: "predictive", futilityThreshold: 0.1, efficacyThreshold: 0.9 } }],
    [
      "uncertain-standard rule (Thall & Simon 1994), uncertain standard toxicity plus margin (Thall, Simon & Estey 1995)",
      {
        ...small,
        rule: { ...small.rule, kind: "uncertainStandard", standard: { a: 6, b: 14 } },
        safety: { kind: "uncertainStandard", standard: { a: 4, b: 16 }, margin: 0.1, prior: { family: "beta", a: 0.6, b: 1.4 }, thetaS: 0.7 },
      },
    ],
  ];
  for (const [label, design] of designs)
    it(`finding 9: equals brute-force enumeration of all 4^6 patient sequences through decideAtLook (${label})`, () => {
      for (const [p, q] of [
        [0.3, 0.2],
        [0.6, 0.45],
      ]) {
        const t = bruteForce(design, singleOutcomes(p, q), ([x, tox], n) => decisionWord(decideAtLook(design, { n, responders: x, toxicities: tox }).decision));
        const [oc] = operatingCharacteristicsWithSafety(design, p, [q]);
        expectMatchesTally(oc, t, 1e-13);
        // Some mass in every kind of stop, so the comparison is not vacuous.
        expect(oc.pSafetyStop).toBeGreaterThan(0.01);
        expect(oc.pEarlyFutility + oc.pEarlyEfficacy).toBeGreaterThan(0.01);
      }
    });

  it("finding 9: two arms (toxicity on the experimental arm) equal brute-force enumeration of all 8^4 pair sequences", () => {
    const two: TwoArmDesign = {
      arms: "two",
      priorT: { family: "uniform" },
      priorC: { family: "uniform" },
      controlRate: 0.3,
      experimentalRate: 0.6,
      delta: 0,
      nMaxPerArm: 4,
      looks: { kind: "list", sizes: [2] },
      rule: { kind: "uncertainStandard", thetaT: 0.8, futilityThreshold: 0.2, efficacyStopping: true, efficacyThreshold: 0.9 },
      safety: { qmax: 0.3, prior: { family: "uniform" }, thetaS: 0.6 },
    };
    const [pT, pC, q] = [0.55, 0.3, 0.35];
    const outcomes = [];
    for (const rT of [0, 1]) for (const rC of [0, 1]) for (const tox of [0, 1]) outcomes.push({ prob: (rT ? pT : 1 - pT) * (rC ? pC : 1 - pC) * (tox ? q : 1 - q), add: [rT, rC, tox] });
    const t = bruteForce(two, outcomes, ([xT, xC, tox], n) => decisionWord(decideAtLook(two, { nT: n, respondersT: xT, nC: n, respondersC: xC, toxicitiesT: tox }).decision));
    const [oc] = operatingCharacteristicsWithSafety(two, [pT, pC], [q]);
    expectMatchesTally(oc, t, 1e-12);
    expect(oc.pSafetyStop).toBeGreaterThan(0.01);
  });

  it("finding 9: the factorised computation equals an independent 2-D forward recursion over (responders, toxicities), Nmax 30", () => {
    const d: SingleArmDesign = { ...small, nMax: 30, looks: { kind: "every", first: 5, every: 5 }, safety: { qmax: 0.25, prior: { family: "beta", a: 0.5, b: 1.5 }, thetaS: 0.85 } };
    const b = singleArmBoundaries(d);
    const sb = safetyBoundaries(d.safety!, b.looks);
    for (const [p, q] of [
      [0.3, 0.1],
      [0.5, 0.3],
      [0.6, 0.5],
    ]) {
      // dist[t][x] over trials still running.
      let dist: number[][] = [[1]];
      let prev = 0;
      const fut: number[] = [];
      const eff: number[] = [];
      const saf: number[] = [];
      b.response.forEach((row, k) => {
        const gap = row.n - prev;
        const ix = binomialPmfs(gap, p);
        const it = binomialPmfs(gap, q);
        const next = Array.from({ length: row.n + 1 }, () => new Array<number>(row.n + 1).fill(0));
        dist.forEach((r, t0) => r.forEach((w, x0) => {
          if (w === 0) return;
          for (let dt = 0; dt <= gap; dt++) for (let dx = 0; dx <= gap; dx++) next[t0 + dt][x0 + dx] += w * it[dt] * ix[dx];
        }));
        let f = 0;
        let e = 0;
        let s = 0;
        const tMin = sb[k].toxicityMin ?? Infinity;
        const fMax = row.futilityMax ?? -1;
        const eMin = row.efficacyMin ?? Infinity;
        next.forEach((r, t) => r.forEach((w, x) => {
          if (t >= tMin) s += w;
          else if (x <= fMax || (row.final && x < eMin)) f += w;
          else if (x >= eMin) e += w;
          else return;
          r[x] = 0;
        }));
        fut.push(f);
        eff.push(e);
        saf.push(s);
        dist = next;
        prev = row.n;
      });
      const [oc] = operatingCharacteristicsWithSafety(d, p, [q]);
      oc.looks.forEach((l, k) => {
        expect(l.pStopFutility).toBeCloseTo(fut[k], 13);
        expect(l.pStopEfficacy).toBeCloseTo(eff[k], 13);
        expect(l.pStopSafety).toBeCloseTo(saf[k], 13);
      });
    }
  });

  it("finding 9: identities: stops sum to one; early termination is futility + efficacy + safety; q = 0 gives the response-only characteristics", () => {
    const d: SingleArmDesign = { ...small, nMax: 40, looks: { kind: "every", first: 10, every: 10 } };
    const grid = [0, 0.1, 0.2, 0.3, 0.5, 0.8];
    const ocs = operatingCharacteristicsWithSafety(d, 0.45, grid);
    for (const oc of ocs) {
      const total = oc.looks.reduce((s, l) => s + l.pStopFutility + l.pStopEfficacy + l.pStopSafety, 0);
      expect(total).toBeCloseTo(1, 13);
      expect(oc.pEarlyTermination).toBeCloseTo(oc.pEarlyFutility + oc.pEarlyEfficacy + oc.pEarlySafety, 15);
    }
    const responseOnly = exactOperatingCharacteristics(singleArmBoundaries(d).response, 0.45);
    expect(ocs[0].pSafetyStop).toBe(0);
    expect(ocs[0].pDeclareSuccess).toBeCloseTo(responseOnly.pDeclareSuccess, 14);
    expect(ocs[0].pEarlyFutility).toBeCloseTo(responseOnly.pEarlyFutility, 14);
    expect(ocs[0].expectedSampleSize).toBeCloseTo(responseOnly.expectedSampleSize, 12);
    // A more toxic drug stops for safety more often and declares efficacy less often.
    for (let i = 1; i < ocs.length; i++) {
      expect(ocs[i].pSafetyStop).toBeGreaterThanOrEqual(ocs[i - 1].pSafetyStop);
      expect(ocs[i].pDeclareSuccess).toBeLessThanOrEqual(ocs[i - 1].pDeclareSuccess + 1e-15);
    }
    expect(ocs[ocs.length - 1].pSafetyStop).toBeGreaterThan(0.9);
  });

  it("finding 9: agrees with the seeded simulator (independent draws, decideAtLook on the full design) within 4 standard errors", () => {
    const d: SingleArmDesign = { ...small, nMax: 24, looks: { kind: "every", first: 6, every: 6 } };
    for (const [p, q] of [
      [0.3, 0.3],
      [0.6, 0.4],
    ]) {
      const [oc] = operatingCharacteristicsWithSafety(d, p, [q]);
      const sim = simulateSingleArmTrialsWithSafety(d, p, q, { trials: 20_000, seed: 9 });
      const se = sim.standardErrors;
      expect(Math.abs(sim.pSafetyStop - oc.pSafetyStop)).toBeLessThan(4 * se.pSafetyStop + 1e-9);
      expect(Math.abs(sim.pEarlyFutility - oc.pEarlyFutility)).toBeLessThan(4 * se.pEarlyFutility + 1e-9);
      expect(Math.abs(sim.pEarlyEfficacy - oc.pEarlyEfficacy)).toBeLessThan(4 * se.pEarlyEfficacy + 1e-9);
      expect(Math.abs(sim.pDeclareSuccess - oc.pDeclareSuccess)).toBeLessThan(4 * se.pDeclareSuccess + 1e-9);
      expect(Math.abs(sim.expectedSampleSize - oc.expectedSampleSize)).toBeLessThan(4 * se.expectedSampleSize + 1e-9);
    }
  });

  it("finding 9: two-arm characteristics with q = 0 equal the response-only two-arm recursion", () => {
    const two: TwoArmDesign = {
      arms: "two",
      priorT: { family: "uniform" },
      priorC: { family: "uniform" },
      controlRate: 0.3,
      experimentalRate: 0.5,
      delta: 0,
      nMaxPerArm: 20,
      looks: { kind: "every", first: 10, every: 5 },
      rule: { kind: "posterior", thetaT: 0.9, futilityThreshold: 0.1, efficacyStopping: false, efficacyThreshold: null },
      safety: { qmax: 0.3, prior: { family: "uniform" }, thetaS: 0.9 },
    };
    const [oc] = operatingCharacteristicsWithSafety(two, [0.5, 0.3], [0]);
    const plain = twoArmOperatingCharacteristics(two, 0.5, 0.3);
    expect(oc.pDeclareSuccess).toBeCloseTo(plain.pDeclareSuccess, 13);
    expect(oc.expectedSampleSize).toBeCloseTo(plain.expectedSampleSize, 12);
  });

  it("rejects: a design without a safety rule, and a rate of the wrong shape", () => {
    expect(() => operatingCharacteristicsWithSafety({ ...small, safety: null }, 0.3, [0.1])).toThrow(StatsDomainError);
    expect(() => operatingCharacteristicsWithSafety(small, [0.3, 0.2], [0.1])).toThrow(StatsDomainError);
    expect(() => operatingCharacteristicsWithSafety(small, 0.3, [1.5])).toThrow(StatsDomainError);
  });
});
