/**
 * Exact operating characteristics. References outside the project:
 * - Simon (1989), Controlled Clinical Trials 10:1-10, Table 1 (optimal design for p0 = 0.1,
 *   p1 = 0.3, alpha = 0.05, beta = 0.2: r1/n1 = 1/10, r/n = 5/29, EN(p0) = 15.0, PET(p0) = 0.74).
 * - stdlib-js binomial pmf (@stdlib/stats-base-dists-binomial-pmf) for closed forms.
 * - Brute-force enumeration of every response sequence of a small trial.
 * - Identities: the stopping probabilities over all looks sum to one.
 */
import { describe, expect, it } from "vitest";
import binomialPmf from "@stdlib/stats-base-dists-binomial-pmf";
import {
  exactOperatingCharacteristics,
  exactSafetyOperatingCharacteristics,
  exactTwoArmOperatingCharacteristics,
  operatingCharacteristicsCurve,
  safetyOperatingCharacteristics,
  singleArmOperatingCharacteristics,
  twoArmOperatingCharacteristics,
  typeIErrorAndPower,
} from "./operating-characteristics";
import { singleArmBoundaries, twoArmBoundaries, type ResponseBoundary } from "./boundaries";
import type { SingleArmDesign, TwoArmDesign } from "./types";
import { StatsDomainError } from "./validate";

const simon: ResponseBoundary[] = [
  { n: 10, final: false, futilityMax: 1, efficacyMin: null },
  { n: 29, final: true, futilityMax: 5, efficacyMin: 6 },
];

describe("exact recursion on a frequentist two-stage rule", () => {
  // Published values recalled from memory (the table is widely reproduced); the next test checks the
  // design's own constraints exactly, which does not depend on memory.
  it("Simon (1989) optimal design 1/10, 5/29 at p0 = 0.1: EN = 15.0 and PET = 0.74 as published", () => {
    const oc = exactOperatingCharacteristics(simon, 0.1);
    expect(oc.expectedSampleSize).toBeCloseTo(15.0, 1);
    expect(oc.pEarlyTermination).toBeCloseTo(0.74, 2);
    // The same PET in closed form with stdlib: P(X1 <= 1), X1 ~ Binomial(10, 0.1).
    expect(oc.pEarlyTermination).toBeCloseTo(binomialPmf(0, 10, 0.1) + binomialPmf(1, 10, 0.1), 14);
  });
  it("Simon (1989): the design meets its constraints, type I error <= 0.05 at p0 = 0.1 and power >= 0.8 at p1 = 0.3", () => {
    expect(exactOperatingCharacteristics(simon, 0.1).pDeclareSuccess).toBeLessThanOrEqual(0.05);
    expect(exactOperatingCharacteristics(simon, 0.3).pDeclareSuccess).toBeGreaterThanOrEqual(0.8);
  });
  it("type I error of the two-stage rule equals its closed form with stdlib binomial pmf", () => {
    let want = 0;
    for (let x1 = 2; x1 <= 10; x1++)
      for (let x2 = 0; x2 <= 19; x2++) if (x1 + x2 > 5) want += binomialPmf(x1, 10, 0.1) * binomialPmf(x2, 19, 0.1);
    expect(exactOperatingCharacteristics(simon, 0.1).pDeclareSuccess).toBeCloseTo(want, 14);
  });
});

const leeLiu: SingleArmDesign = {
  arms: "single",
  prior: { family: "beta", a: 0.6, b: 0.4 },
  p0: 0.2,
  p1: 0.4,
  delta: 0,
  nMax: 40,
  looks: { kind: "every", first: 10, every: 1 },
  rule: { kind: "predictive", thetaT: 0.9, futilityThreshold: 0.05, efficacyStopping: true, efficacyThreshold: 0.99 },
  safety: { qmax: 0.3, prior: { family: "beta", a: 0.6, b: 1.4 }, thetaS: 0.9 },
};

describe("exact single-arm operating characteristics of a Bayesian design", () => {
  it("identity: stopping probabilities over all looks, and the sample-size distribution, sum to one", () => {
    for (const p of [0, 0.05, 0.2, 0.4, 0.7, 1]) {
      const oc = singleArmOperatingCharacteristics(leeLiu, p);
      const total = oc.looks.reduce((s, l) => s + l.pStopFutility + l.pStopEfficacy, 0);
      expect(Math.abs(total - 1), `p=${p}`).toBeLessThan(1e-12);
      expect(Math.abs(oc.sampleSizeDistribution.reduce((s, d) => s + d.probability, 0) - 1)).toBeLessThan(1e-12);
      expect(Math.abs(oc.pEarlyTermination + oc.pSuccessAtEnd + oc.pNoSuccessAtEnd - 1)).toBeLessThan(1e-12);
      expect(oc.pDeclareSuccess).toBeCloseTo(oc.pSuccessAtEnd + oc.pEarlyEfficacy, 15);
    }
  });

  it("agrees with brute-force enumeration of all 2^14 response sequences (Nmax 14, looks 4, 7, 10, 14)", () => {
    const d: SingleArmDesign = { ...leeLiu, nMax: 14, looks: { kind: "list", sizes: [4, 7, 10] }, safety: null };
    const b = singleArmBoundaries(d).response;
    for (const p of [0.2, 0.45]) {
      const oc = exactOperatingCharacteristics(b, p);
      let success = 0;
      let early = 0;
      let en = 0;
      for (let mask = 0; mask < 1 << 14; mask++) {
        let x = 0;
        let prob = 1;
        for (let i = 0; i < 14; i++) prob *= mask & (1 << i) ? p : 1 - p;
        let i = 0;
        for (const row of b) {
          for (; i < row.n; i++) if (mask & (1 << i)) x++;
          const fut = row.futilityMax !== null && x <= row.futilityMax;
          const eff = row.efficacyMin !== null && x >= row.efficacyMin;
          if (fut || eff || row.final) {
            if (eff) success += prob;
            if (!row.final) early += prob;
            en += row.n * prob;
            break;
          }
        }
      }
      // 2^14 products summed in a different order: agreement to 5e-13 (relative error of the sums).
      expect(oc.pDeclareSuccess).toBeCloseTo(success, 12);
      expect(oc.pEarlyTermination).toBeCloseTo(early, 12);
      expect(oc.expectedSampleSize).toBeCloseTo(en, 11);
    }
  });

  it("type I error and power are P(declare success) at p0 and p1; the curve reuses the same boundaries", () => {
    const r = typeIErrorAndPower(leeLiu);
    const curve = operatingCharacteristicsCurve(leeLiu, [0.2, 0.4]);
    expect(r.typeIError).toBe(curve[0].pDeclareSuccess);
    expect(r.power).toBe(curve[1].pDeclareSuccess);
    expect(r.typeIError).toBeLessThan(r.power);
  });

  it("safety-only characteristics: two looks against the closed form with stdlib binomial pmf", () => {
    const b = [
      { n: 5, toxicityMin: 3 },
      { n: 10, toxicityMin: 5 },
    ];
    const q = 0.35;
    const oc = exactSafetyOperatingCharacteristics(b, q);
    let first = 0;
    for (let t = 3; t <= 5; t++) first += binomialPmf(t, 5, q);
    let second = 0;
    for (let t1 = 0; t1 < 3; t1++) for (let t2 = 5 - t1; t2 <= 5; t2++) second += binomialPmf(t1, 5, q) * binomialPmf(t2, 5, q);
    expect(oc.looks[0].pSafetyStop).toBeCloseTo(first, 14);
    expect(oc.looks[1].pSafetyStop).toBeCloseTo(second, 14);
    expect(oc.pEarlySafetyStop).toBeCloseTo(first, 14);
    expect(oc.expectedSampleSize).toBeCloseTo(5 * first + 10 * (1 - first), 13);
  });

  it("a design's safety characteristics use its looks; null without a safety rule", () => {
    const oc = safetyOperatingCharacteristics(leeLiu, 0.5)!;
    expect(oc.looks.map((l) => l.n)).toEqual(Array.from({ length: 31 }, (_, i) => 10 + i));
    expect(oc.pSafetyStop).toBeGreaterThan(0.9);
    expect(safetyOperatingCharacteristics({ ...leeLiu, safety: null }, 0.5)).toBeNull();
  });

  const bad: [string, () => unknown][] = [
    ["p must lie in [0, 1]", () => exactOperatingCharacteristics(simon, 1.1)],
    ["futilityMax must not exceed n", () => exactOperatingCharacteristics([{ n: 5, final: true, futilityMax: 6, efficacyMin: null }], 0.3)],
    ["efficacyMin must exceed futilityMax", () => exactOperatingCharacteristics([{ n: 5, final: true, futilityMax: 3, efficacyMin: 3 }], 0.3)],
    ["looks must increase", () => exactOperatingCharacteristics([{ ...simon[0] }, { ...simon[1], n: 10 }], 0.3)],
    ["only the last look is final", () => exactOperatingCharacteristics([{ ...simon[0], final: true }, simon[1]], 0.3)],
    ["the table must not be empty", () => exactOperatingCharacteristics([], 0.3)],
    ["q must lie in [0, 1]", () => exactSafetyOperatingCharacteristics([{ n: 5, toxicityMin: 2 }], -0.1)],
  ];
  for (const [title, call] of bad) it(`rejects: ${title}`, () => expect(call).toThrow(StatsDomainError));
});

describe("exact two-arm operating characteristics", () => {
  const two: TwoArmDesign = {
    arms: "two",
    priorT: { family: "uniform" },
    priorC: { family: "uniform" },
    controlRate: 0.3,
    experimentalRate: 0.6,
    delta: 0,
    nMaxPerArm: 9,
    looks: { kind: "list", sizes: [3, 6] },
    rule: { kind: "predictive", thetaT: 0.9, futilityThreshold: 0.1, efficacyStopping: true, efficacyThreshold: 0.97 },
    safety: null,
  };
  it("identity: stopping probabilities sum to one at several (pT, pC)", () => {
    for (const [pT, pC] of [
      [0.3, 0.3],
      [0.6, 0.3],
      [0, 1],
      [0.9, 0.1],
    ]) {
      const oc = twoArmOperatingCharacteristics(two, pT, pC);
      expect(Math.abs(oc.looks.reduce((s, l) => s + l.pStopFutility + l.pStopEfficacy, 0) - 1)).toBeLessThan(1e-12);
    }
  });
  it("agrees with a direct sum over every path of per-look increments (stdlib binomial pmf)", () => {
    const b = twoArmBoundaries(two).response;
    const pT = 0.55;
    const pC = 0.35;
    const oc = exactTwoArmOperatingCharacteristics(b, pT, pC);
    let success = 0;
    let en = 0;
    const walk = (k: number, xT: number, xC: number, prob: number, prev: number) => {
      const row = b[k];
      const gap = row.n - prev;
      for (let yT = 0; yT <= gap; yT++)
        for (let yC = 0; yC <= gap; yC++) {
          const pr = prob * binomialPmf(yT, gap, pT) * binomialPmf(yC, gap, pC);
          const t = xT + yT;
          const c = xC + yC;
          const f = row.futilityMaxT[c];
          const e = row.efficacyMinT[c];
          const fut = f !== null && t <= f;
          const eff = e !== null && t >= e;
          if (fut || eff || row.final) {
            if (eff) success += pr;
            en += row.n * pr;
          } else walk(k + 1, t, c, pr, row.n);
        }
    };
    walk(0, 0, 0, 1, 0);
    expect(oc.pDeclareSuccess).toBeCloseTo(success, 13);
    expect(oc.expectedSampleSize).toBeCloseTo(en, 12);
  });
  it("rejects: pT must lie in [0, 1]", () => {
    expect(() => twoArmOperatingCharacteristics(two, 2, 0.3)).toThrow(StatsDomainError);
  });
});
