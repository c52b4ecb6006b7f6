/**
 * The closed review, checked against a published worked example (Lee & Liu 2008), the @stdlib
 * reference distributions (independent of lib/stats) and exact identities.
 */
import { describe, expect, it } from "vitest";
import stdlibBetaCdf from "@stdlib/stats-base-dists-beta-cdf";
import stdlibBetaPdf from "@stdlib/stats-base-dists-beta-pdf";
import stdlibBetaln from "@stdlib/math-base-special-betaln";
import jstat from "jstat";
import { armPosterior, computeReview, intervalProbabilityOf, reproducibilityRecord, scepticalPrior, type ReviewInput } from "./compute-review";
import { decideAtLook } from "@/lib/stats/decision";
import type { SingleArmDesign, TwoArmDesign } from "@/lib/stats/types";
import { ENGINE_VERSION } from "@/lib/stats/version";
import { StatsDomainError } from "@/lib/stats/validate";
import { SINGLE_ARM_DEMO_DESIGN, TWO_ARM_DEMO_DESIGN } from "@/db/seeds/demo-designs";

const close = (actual: number, expected: number, tol: number) => {
  expect(Math.abs(actual - expected), `expected ${expected}, got ${actual}, tolerance ${tol}`).toBeLessThanOrEqual(tol);
};

// The demo trial's single-arm design (Beta(0.6, 0.4) prior, p0 = 0.2, nMax = 40, safety Beta(0.6, 1.4)).
const SINGLE: SingleArmDesign = SINGLE_ARM_DEMO_DESIGN;

const singleInput = (over: Partial<ReviewInput> = {}): ReviewInput => ({
  design: SINGLE,
  arms: [{ id: 7, label: "Arm A", role: "single" }],
  looks: [
    { analysisId: 101, lookNumber: 1, cutoffDate: "2026-01-31", counts: [{ armId: 7, enrolled: 11, treated: 10, evaluable: 10, responders: 3, toxicities: 1 }] },
    { analysisId: 102, lookNumber: 2, cutoffDate: "2026-03-31", counts: [{ armId: 7, enrolled: 21, treated: 20, evaluable: 20, responders: 6, toxicities: 3 }] },
  ],
  analysisId: 102,
  generatedAt: "2026-04-02T09:00:00.000Z",
  ...over,
});

describe("single arm", () => {
  const r = computeReview(singleInput());

  it("the posterior after x of n is Beta(a + x, b + n - x) (conjugacy, exact identity)", () => {
    expect(r.arms[0].posterior).toHaveLength(1);
    close(r.arms[0].posterior[0].a, 0.6 + 6, 1e-14);
    close(r.arms[0].posterior[0].b, 0.4 + 14, 1e-14);
    close(r.arms[0].summary.mean, 6.6 / 21, 1e-15);
  });

  it("P(p > p0 | data) equals 1 - F(p0) with @stdlib's Beta CDF", () => {
    close(r.arms[0].probAboveP0 as number, 1 - stdlibBetaCdf(0.2, 6.6, 14.4), 1e-10);
  });

  it("the density and cumulative curves on the grid match @stdlib's Beta pdf and CDF", () => {
    const c = r.arms[0].curves;
    expect(c.p).toHaveLength(201);
    for (const i of [20, 60, 100, 150]) {
      close(c.density[i] as number, stdlibBetaPdf(c.p[i], 6.6, 14.4), 1e-9);
      close(c.cdf[i], stdlibBetaCdf(c.p[i], 6.6, 14.4), 1e-10);
    }
  });

  it("keeps the history of looks up to the reviewed one, each with its predictive probability", () => {
    expect(r.history.map((h) => h.lookNumber)).toEqual([1, 2]);
    for (const h of r.history) expect(h.evaluation.predictiveProbability).toBeGreaterThan(0);
    expect(r.observedPath).toEqual([
      { lookNumber: 1, n: 10, responders: 3 },
      { lookNumber: 2, n: 20, responders: 6 },
    ]);
    const first = computeReview(singleInput({ analysisId: 101 }));
    expect(first.history).toHaveLength(1);
    expect(first.current.n).toBe(10);
  });

  it("the boundary table has one row per planned look and the observed counts are not in the futility region when the decision is to continue", () => {
    expect(r.boundaries.map((b) => b.n)).toEqual([10, 20, 30, 40]);
    expect(r.decision.action).toBe("continue");
    const row = r.boundaries.find((b) => b.n === 20)!;
    expect(row.futilityMax === null || 6 > row.futilityMax).toBe(true);
  });

  it("safety: P(q > qmax | t of n) is 1 - F(qmax) under Beta(0.6 + t, 1.4 + n - t) (@stdlib) and is flagged only when above thetaS", () => {
    close(r.safety!.probAboveLimit, 1 - stdlibBetaCdf(0.3, 3.6, 18.4), 1e-10);
    expect(r.safety!.crossed).toBe(false);
    const toxic = computeReview(singleInput({ looks: [{ analysisId: 102, lookNumber: 2, cutoffDate: null, counts: [{ armId: 7, enrolled: 21, treated: 20, evaluable: 20, responders: 6, toxicities: 11 }] }] }));
    expect(toxic.safety!.crossed).toBe(true);
    expect(toxic.decision).toMatchObject({ action: "stop", stop: "safety" });
  });

  // Finding 1. jstat 1.9.6 (npm) is an independent Beta CDF; its continued fraction stops at a
  // relative change of 3e-7, hence the 1e-6 tolerance.
  it("finding 1: the safety posterior's denominator is the treated count, not the patients evaluable for response (8 of 21 treated, 15 evaluable)", () => {
    const at = (treated: number) =>
      computeReview(singleInput({ looks: [{ analysisId: 102, lookNumber: 2, cutoffDate: null, counts: [{ armId: 7, enrolled: 21, treated, evaluable: 15, responders: 4, toxicities: 8 }] }] }));
    const right = at(21);
    // Beta(0.6 + 8, 1.4 + 21 - 8) = Beta(8.6, 14.4).
    close(right.safety!.probAboveLimit, 1 - jstat.jStat.beta.cdf(0.3, 8.6, 14.4), 1e-6);
    expect(right.safety!.probAboveLimit.toFixed(3)).toBe("0.762");
    expect(right.safety!.treated).toBe(21);
    expect(right.safety!.crossed).toBe(false);
    expect(right.decision.action).not.toBe("stop");
    expect(right.decision.reason).toMatch(/8 with toxicity among 21 treated patients/);
    expect(right.current.evaluation.safetyProbability).toBe(right.safety!.probAboveLimit);
    // The response posterior still uses the 15 evaluable for response.
    expect(right.arms[0].posterior[0]).toMatchObject({ a: 0.6 + 4, b: 0.4 + 15 - 4 });
    // Had the 15 been used for toxicity: Beta(8.6, 8.4), 0.960, a safety stop.
    const wrong = at(15);
    close(wrong.safety!.probAboveLimit, 1 - jstat.jStat.beta.cdf(0.3, 8.6, 8.4), 1e-6);
    expect(wrong.safety!.probAboveLimit.toFixed(3)).toBe("0.960");
    expect(wrong.decision).toMatchObject({ action: "stop", stop: "safety" });
  });

  it("finding 1: more toxicities than patients evaluable for response no longer break the review", () => {
    const r = computeReview(singleInput({ looks: [{ analysisId: 102, lookNumber: 2, cutoffDate: null, counts: [{ armId: 7, enrolled: 21, treated: 21, evaluable: 5, responders: 1, toxicities: 12 }] }] }));
    close(r.safety!.probAboveLimit, 1 - jstat.jStat.beta.cdf(0.3, 12.6, 10.4), 1e-6);
    expect(r.safety!.observedPath).toEqual([{ lookNumber: 2, n: 21, toxicities: 12 }]);
  });

  it("prior sensitivity: design, uniform and sceptical priors side by side; the sceptical prior is centred at p0 with ESS 10% of nMax", () => {
    expect(r.sensitivity.map((s) => s.key)).toEqual(["design", "uniform", "sceptical"]);
    expect(scepticalPrior(0.2, 40)).toEqual({ family: "informative", mean: 0.2, ess: 4 });
    close(r.sensitivity[1].arms[0].summary.mean, 7 / 22, 1e-15); // Beta(1 + 6, 1 + 14)
    close(r.sensitivity[2].arms[0].summary.mean, 6.8 / 24, 1e-15); // Beta(0.8 + 6, 3.2 + 14)
    // The sceptical prior pulls towards p0, so the estimate and P(p > p0) fall.
    expect(r.sensitivity[2].arms[0].probAboveP0!).toBeLessThan(r.sensitivity[1].arms[0].probAboveP0!);
  });

  it("the interval question: P(lo < p <= hi) = F(hi) - F(lo) with @stdlib, and lo >= hi is refused", () => {
    const post = armPosterior(SINGLE, singleInput().arms, singleInput().looks[1], 7);
    close(intervalProbabilityOf(post, 0.2, 0.4), stdlibBetaCdf(0.4, 6.6, 14.4) - stdlibBetaCdf(0.2, 6.6, 14.4), 1e-12);
    expect(() => intervalProbabilityOf(post, 0.4, 0.4)).toThrow(StatsDomainError);
    expect(() => armPosterior(SINGLE, singleInput().arms, singleInput().looks[1], 99)).toThrow(StatsDomainError);
  });
});

describe("predictive probability against the published example", () => {
  it("Lee & Liu (2008, Clinical Trials 5:93-106), worked example: Beta(0.6, 0.4) prior, p0 = 0.6, thetaT = 0.9, 16 responders of 23, Nmax = 40 gives PP = 0.5656", () => {
    const design: SingleArmDesign = { ...SINGLE, p0: 0.6, p1: 0.8, looks: { kind: "list", sizes: [23] }, safety: null };
    const r = computeReview({
      design,
      arms: [{ id: 1, label: "A", role: "single" }],
      looks: [{ analysisId: 1, lookNumber: 1, cutoffDate: null, counts: [{ armId: 1, enrolled: 23, treated: null, evaluable: 23, responders: 16, toxicities: null }] }],
      analysisId: 1,
      generatedAt: "2026-01-01T00:00:00.000Z",
    });
    close(r.current.evaluation.predictiveProbability as number, 0.5656, 5e-5);
    expect(r.decision.action).toBe("continue");
  });
});

describe("two arms", () => {
  // The demo's two-arm design with a uniform control prior and 30 per arm, looks at 15 and 30.
  const TWO: TwoArmDesign = { ...TWO_ARM_DEMO_DESIGN, priorC: { family: "uniform" }, nMaxPerArm: 30, looks: { kind: "list", sizes: [15, 30] } };
  const input: ReviewInput = {
    design: TWO,
    arms: [
      { id: 1, label: "E", role: "experimental" },
      { id: 2, label: "C", role: "control" },
    ],
    looks: [{ analysisId: 5, lookNumber: 1, cutoffDate: null, counts: [{ armId: 1, enrolled: 15, treated: null, evaluable: 15, responders: 8, toxicities: null }, { armId: 2, enrolled: 15, treated: null, evaluable: 15, responders: 4, toxicities: null }] }],
    analysisId: 5,
    generatedAt: "2026-01-01T00:00:00.000Z",
  };
  const r = computeReview(input);

  it("P(pT - pC > 0) matches a direct quadrature of f_T(x) F_C(x) with @stdlib's pdf and CDF (20000-point midpoint rule)", () => {
    let s = 0;
    const N = 20000;
    for (let i = 0; i < N; i++) {
      const x = (i + 0.5) / N;
      s += stdlibBetaPdf(x, 9, 8) * stdlibBetaCdf(x, 5, 12);
    }
    close(r.difference!.probExceeds, s / N, 1e-7);
  });

  it("the difference density integrates to 1 over [-1, 1] and the control posterior is the plot's reference", () => {
    const { d, density } = r.difference!.grid;
    const step = d[1] - d[0];
    close(density.reduce((a, b) => a + b, 0) * step, 1, 1e-2);
    expect(r.reference).toEqual({ kind: "control", armId: 2 });
  });

  it("boundary rows are read at the observed control count where the look happened, projected otherwise", () => {
    expect(r.boundaries[0]).toMatchObject({ n: 15, controlResponders: 4, controlBasis: "observed" });
    expect(r.boundaries[1]).toMatchObject({ n: 30, controlResponders: 8, controlBasis: "projected", final: true });
  });

  it("a missing count row is a clear domain error, not a crash", () => {
    expect(() => computeReview({ ...input, looks: [{ ...input.looks[0], counts: [input.looks[0].counts[0]] }] })).toThrow(/no row for the arm "C"/);
  });
});

describe("reproducibility record", () => {
  it("carries the engine version, the time given and the inputs; recomputing from its inputs gives identical outputs", () => {
    const input = singleInput();
    const rec = reproducibilityRecord(input);
    expect(rec.engineVersion).toBe(ENGINE_VERSION);
    expect(rec.generatedAt).toBe("2026-04-02T09:00:00.000Z");
    const again = computeReview({ ...rec.inputs, generatedAt: rec.generatedAt });
    expect(JSON.parse(JSON.stringify(again))).toEqual(JSON.parse(JSON.stringify(rec.outputs)));
  });
  it("an analysis id that is not among the looks is refused", () => {
    expect(() => computeReview(singleInput({ analysisId: 999 }))).toThrow(StatsDomainError);
  });
});

// Finding 4: a look whose evaluable count differs from its planned size (21 where 20 was planned,
// common in practice, no source) is placed against boundaries computed at the count observed.
describe("observed data vanish when n differs from the plan (finding 4)", () => {
  const EFF: SingleArmDesign = { ...SINGLE, rule: { kind: "predictive", thetaT: 0.9, futilityThreshold: 0.05, efficacyStopping: true, efficacyThreshold: 0.95 } };
  const offPlan = (design: SingleArmDesign, n: number, x: number, t: number): ReviewInput =>
    singleInput({
      design,
      looks: [
        { analysisId: 101, lookNumber: 1, cutoffDate: "2026-01-31", plannedN: 10, counts: [{ armId: 7, enrolled: 11, treated: 10, evaluable: 10, responders: 3, toxicities: 1 }] },
        { analysisId: 102, lookNumber: 2, cutoffDate: "2026-03-31", plannedN: 20, counts: [{ armId: 7, enrolled: n + 1, treated: n, evaluable: n, responders: x, toxicities: t }] },
      ],
    });

  /** PP by the definition (Lee & Liu 2008) with @stdlib's betaln and Beta CDF only: independent of lib/stats. */
  function stdlibPP(a: number, b: number, x: number, n: number, nMax: number, p0: number, thetaT: number): number {
    const m = nMax - n;
    let pp = 0;
    for (let y = 0; y <= m; y++) {
      const logPmf = -Math.log(m + 1) - stdlibBetaln(y + 1, m - y + 1) + stdlibBetaln(a + x + y, b + n - x + m - y) - stdlibBetaln(a + x, b + n - x);
      if (1 - stdlibBetaCdf(p0, a + x + y, b + nMax - x - y) > thetaT) pp += Math.exp(logPmf);
    }
    return pp;
  }

  it("the boundary at the actual n = 21 equals a brute-force search over x with @stdlib's PP and with the engine's decision at the look", () => {
    const r = computeReview(offPlan(EFF, 21, 6, 3));
    const row = r.observedBoundaries.find((o) => o.lookNumber === 2)!;
    expect(row).toMatchObject({ plannedN: 20, n: 21, responders: 6, final: false });
    let futStdlib: number | null = null;
    let effStdlib: number | null = null;
    let futEngine: number | null = null;
    let effEngine: number | null = null;
    for (let x = 0; x <= 21; x++) {
      const pp = stdlibPP(0.6, 0.4, x, 21, 40, 0.2, 0.9);
      if (pp < 0.05) futStdlib = x;
      if (pp > 0.95 && effStdlib === null) effStdlib = x;
      const ev = decideAtLook({ ...EFF, safety: null }, { n: 21, responders: x });
      if (ev.decision.action === "stop" && ev.decision.stop === "futility") futEngine = x;
      if (ev.decision.action === "stop" && ev.decision.stop === "efficacy" && effEngine === null) effEngine = x;
    }
    expect(futStdlib).not.toBeNull();
    expect(effStdlib).not.toBeNull();
    expect([row.futilityMax, row.efficacyMin]).toEqual([futStdlib, effStdlib]);
    expect([row.futilityMax, row.efficacyMin]).toEqual([futEngine, effEngine]);
    // The planned look's boundaries stay beside it, from the planned table.
    const planned = r.boundaries.find((b) => b.n === 20)!;
    expect(row.planned).toEqual({ n: 20, futilityMax: planned.futilityMax, efficacyMin: planned.efficacyMin });
    // The region shown agrees with the decision the rule takes at the look.
    expect(row.region).toBe(r.decision.action === "stop" ? r.decision.stop : "continue");
  });

  it("an observation in the futility region at the actual n is reported there, matching the decision", () => {
    const r = computeReview(offPlan(EFF, 21, 1, 3));
    const row = r.observedBoundaries.at(-1)!;
    expect(row.futilityMax).not.toBeNull();
    expect(1).toBeLessThanOrEqual(row.futilityMax!);
    expect(row.region).toBe("futility");
    expect(r.decision).toMatchObject({ action: "stop", stop: "futility" });
  });

  it("a look at its planned size reads the same boundary as the planned table (exact identity)", () => {
    const r = computeReview(offPlan(EFF, 20, 6, 3));
    const row = r.observedBoundaries.at(-1)!;
    const planned = r.boundaries.find((b) => b.n === 20)!;
    expect([row.futilityMax, row.efficacyMin]).toEqual([planned.futilityMax, planned.efficacyMin]);
  });

  it("safety: the boundary at the actual denominator equals a brute-force search over t with @stdlib's Beta CDF", () => {
    const r = computeReview(offPlan(EFF, 21, 6, 3));
    const row = r.safety!.observed.find((o) => o.lookNumber === 2)!;
    expect(row).toMatchObject({ plannedN: 20, n: 21, toxicities: 3 });
    let min: number | null = null;
    for (let t = 21; t >= 0; t--) if (1 - stdlibBetaCdf(0.3, 0.6 + t, 1.4 + 21 - t) > 0.9) min = t;
    expect(min).not.toBeNull();
    expect(row.toxicityMin).toBe(min);
    expect(row.planned).toEqual({ n: 20, toxicityMin: r.safety!.boundary.find((b) => b.n === 20)!.toxicityMin });
    expect(row.crossed).toBe(false);
    const toxic = computeReview(offPlan(EFF, 21, 6, min!));
    expect(toxic.safety!.observed.at(-1)!.crossed).toBe(true);
    expect(toxic.safety!.crossed).toBe(true);
  });

  it("two arms with 21 experimental and 20 control patients: the experimental boundary at the observed control count equals a brute-force search with the engine's PP", () => {
    const TWO: TwoArmDesign = {
      arms: "two",
      priorT: { family: "uniform" },
      priorC: { family: "uniform" },
      controlRate: 0.3,
      experimentalRate: 0.5,
      delta: 0,
      nMaxPerArm: 30,
      looks: { kind: "list", sizes: [20, 30] },
      rule: { kind: "predictive", thetaT: 0.95, futilityThreshold: 0.1, efficacyStopping: true, efficacyThreshold: 0.99 },
      safety: null,
    };
    const r = computeReview({
      design: TWO,
      arms: [
        { id: 1, label: "E", role: "experimental" },
        { id: 2, label: "C", role: "control" },
      ],
      looks: [{ analysisId: 5, lookNumber: 1, cutoffDate: null, plannedN: 20, counts: [{ armId: 1, enrolled: 21, treated: null, evaluable: 21, responders: 9, toxicities: null }, { armId: 2, enrolled: 20, treated: null, evaluable: 20, responders: 6, toxicities: null }] }],
      analysisId: 5,
      generatedAt: "2026-01-01T00:00:00.000Z",
    });
    const row = r.observedBoundaries[0];
    expect(row).toMatchObject({ plannedN: 20, n: 21, nControl: 20, controlResponders: 6 });
    let fut: number | null = null;
    let eff: number | null = null;
    for (let xT = 0; xT <= 21; xT++) {
      const d = decideAtLook(TWO, { nT: 21, respondersT: xT, nC: 20, respondersC: 6 }).decision;
      if (d.action === "stop" && d.stop === "futility") fut = xT;
      if (d.action === "stop" && d.stop === "efficacy" && eff === null) eff = xT;
    }
    expect(fut).not.toBeNull();
    expect([row.futilityMax, row.efficacyMin]).toEqual([fut, eff]);
  });

});

describe("Wilson interval beside Clopper-Pearson", () => {
  it("6 of 20 at 95%: the closed form (x + z²/2 ± z√(x(n−x)/n + z²/4)) / (n + z²) with z = 1.959963984540054 (value from memory)", () => {
    const r = computeReview(singleInput());
    const z = 1.959963984540054;
    const half = z * Math.sqrt((6 * 14) / 20 + (z * z) / 4);
    close(r.arms[0].wilson.lower, (6 + (z * z) / 2 - half) / (20 + z * z), 1e-9);
    close(r.arms[0].wilson.upper, (6 + (z * z) / 2 + half) / (20 + z * z), 1e-9);
    // Brown, Cai & DasGupta (2001): Wilson is narrower than the exact interval away from the edges.
    expect(r.arms[0].wilson.upper - r.arms[0].wilson.lower).toBeLessThan(r.arms[0].clopperPearson.upper - r.arms[0].clopperPearson.lower);
  });
});
