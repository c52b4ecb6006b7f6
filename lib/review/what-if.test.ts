/**
 * What if and pending outcomes at the review level. References: the engine's own `decideAtLook`
 * and predictive probability at the same counts (the what-if must be exactly a look held there),
 * and exact identities: pending patients are future patients (moving them into the future by hand
 * leaves the predictive probability unchanged), and the law of total probability over the pending
 * outcomes gives back the predictive probability now.
 */
import { describe, expect, it } from "vitest";
import { computeReview, type ReviewInput } from "./compute-review";
import { pendingOutlookForReview, whatIf, whatItTakesForReview } from "./what-if";
import { decideAtLook } from "@/lib/stats/decision";
import { predictiveProbabilitySingleArm, predictiveProbabilityTwoArm, twoArmFinalRule } from "@/lib/stats/predictive";
import { resolvePrior } from "@/lib/stats/priors";
import { StatsDomainError } from "@/lib/stats/validate";
import { SINGLE_ARM_DEMO_DESIGN, TWO_ARM_DEMO_DESIGN } from "@/db/seeds/demo-designs";


const single = (pending: number, enrolled = 21 + pending): ReviewInput => ({
  design: SINGLE_ARM_DEMO_DESIGN,
  arms: [{ id: 7, label: "Arm A", role: "single" }],
  looks: [{ analysisId: 102, lookNumber: 2, cutoffDate: "2026-03-31", counts: [{ armId: 7, enrolled, treated: 20, evaluable: 20, responders: 6, toxicities: 3, pending }] }],
  analysisId: 102,
  generatedAt: "2026-04-02T09:00:00.000Z",
});

const two = (pendingT: number, pendingC: number): ReviewInput => ({
  design: TWO_ARM_DEMO_DESIGN,
  arms: [
    { id: 1, label: "Experimental", role: "experimental" },
    { id: 2, label: "Control", role: "control" },
  ],
  looks: [
    {
      analysisId: 201,
      lookNumber: 1,
      cutoffDate: "2026-08-31",
      counts: [
        { armId: 1, enrolled: 20 + pendingT, treated: null, evaluable: 20, responders: 9, toxicities: null, pending: pendingT },
        { armId: 2, enrolled: 20 + pendingC, treated: null, evaluable: 20, responders: 5, toxicities: null, pending: pendingC },
      ],
    },
  ],
  analysisId: 201,
  generatedAt: "2026-09-08T10:00:00.000Z",
});

describe("whatIf", () => {
  it("with no more patients is the look under review itself", () => {
    const r = computeReview(single(0));
    const a = whatIf(single(0), { arms: "single", patients: 0, responders: 0 });
    expect(a.predictiveProbability).toBe(r.current.evaluation.predictiveProbability);
    expect(a.decision.action).toBe(r.current.evaluation.decision.action);
  });

  it("single arm: equals the engine's decision and predictive probability at the hypothetical counts", () => {
    for (const [k, y] of [[10, 0], [10, 2], [10, 5], [10, 10], [20, 3], [20, 9], [7, 1]] as const) {
      const a = whatIf(single(1), { arms: "single", patients: k, responders: y });
      const ev = decideAtLook({ ...SINGLE_ARM_DEMO_DESIGN, safety: null }, { n: 20 + k, responders: 6 + y });
      expect(a.to).toEqual({ n: 20 + k, responders: 6 + y, nControl: null, respondersControl: null });
      expect(a.decision).toEqual(ev.decision);
      expect(a.final).toBe(20 + k === 40);
      expect(a.plannedLook).toBe([30, 40].includes(20 + k) ? 20 + k : null);
      if (20 + k < 40) expect(a.predictiveProbability).toBe(predictiveProbabilitySingleArm({ prior: resolvePrior(SINGLE_ARM_DEMO_DESIGN.prior), x: 6 + y, n: 20 + k, nMax: 40, p0: 0.2, thetaT: 0.9 }));
      else expect(a.predictiveProbability).toBeNull();
      // The decision agrees with the boundary at that count.
      if (a.boundary.futilityMax !== null && 6 + y <= a.boundary.futilityMax) expect(["stop", "final"]).toContain(a.decision.action);
    }
  });

  it("two arms: equals the engine at the hypothetical counts", () => {
    const rule = twoArmFinalRule(resolvePrior(TWO_ARM_DEMO_DESIGN.priorT), resolvePrior(TWO_ARM_DEMO_DESIGN.priorC), 60, 0, 0.95);
    for (const [kT, yT, kC, yC] of [[20, 10, 20, 5], [20, 4, 20, 10], [40, 30, 40, 10], [10, 5, 12, 2]] as const) {
      const a = whatIf(two(0, 0), { arms: "two", patientsT: kT, respondersT: yT, patientsC: kC, respondersC: yC });
      const ev = decideAtLook(TWO_ARM_DEMO_DESIGN, { nT: 20 + kT, respondersT: 9 + yT, nC: 20 + kC, respondersC: 5 + yC });
      expect(a.decision).toEqual(ev.decision);
      if (!a.final) expect(a.predictiveProbability).toBe(predictiveProbabilityTwoArm({ priorT: resolvePrior(TWO_ARM_DEMO_DESIGN.priorT), priorC: resolvePrior(TWO_ARM_DEMO_DESIGN.priorC), xT: 9 + yT, nT: 20 + kT, xC: 5 + yC, nC: 20 + kC, finalRule: rule }));
    }
  });

  it("refuses negative, non-whole, too many patients and more responders than patients, naming the limit", () => {
    const bad: Array<[number, number, RegExp]> = [
      [-1, 0, /whole number, 0 or more/],
      [2.5, 1, /whole number/],
      [21, 3, /must not exceed the 20 patients still to come/],
      [5, 6, /must not exceed the 5 hypothetical patients/],
    ];
    for (const [k, y, msg] of bad) {
      expect(() => whatIf(single(0), { arms: "single", patients: k, responders: y })).toThrow(StatsDomainError);
      expect(() => whatIf(single(0), { arms: "single", patients: k, responders: y })).toThrow(msg);
    }
    expect(() => whatIf(single(0), { arms: "two", patientsT: 1, respondersT: 0, patientsC: 1, respondersC: 0 })).toThrow(/do not match this single-arm trial/);
    expect(() => whatIf(two(0, 0), { arms: "two", patientsT: 41, respondersT: 0, patientsC: 1, respondersC: 0 })).toThrow(/experimental patients must not exceed the 40/);
  });
});

describe("pending outcomes", () => {
  it("single arm: the predictive probability with pending patients equals the one with those patients moved to the future by hand", () => {
    for (const p of [1, 3, 7]) {
      const withPending = computeReview(single(p));
      // By hand: the pending patients were never enrolled at the cut-off (they are simply future patients).
      const byHand = computeReview(single(0, 21));
      expect(withPending.current.evaluation.predictiveProbability).toBe(byHand.current.evaluation.predictiveProbability);
      // And the two-stage sum over the pending outcomes gives it back (law of total probability).
      const o = pendingOutlookForReview(single(p))!;
      expect(o.arms).toBe("single");
      expect(Math.abs(o.predictiveProbability - (byHand.current.evaluation.predictiveProbability as number))).toBeLessThan(1e-12);
      if (o.arms === "single") {
        expect(o.rows).toHaveLength(p + 1);
        expect(Math.abs(o.rows.reduce((s, r) => s + r.probability, 0) - 1)).toBeLessThan(1e-12);
        // More responders among the pending patients can only raise the predictive probability.
        for (let z = 1; z <= p; z++) expect(o.rows[z].predictiveProbability).toBeGreaterThanOrEqual(o.rows[z - 1].predictiveProbability);
      }
    }
    expect(pendingOutlookForReview(single(0))).toBeNull();
  });

  it("two arms: the same identities", () => {
    const byHand = computeReview(two(0, 0)).current.evaluation.predictiveProbability as number;
    const withPending = computeReview(two(2, 3)).current.evaluation.predictiveProbability as number;
    expect(withPending).toBe(byHand);
    const o = pendingOutlookForReview(two(2, 3))!;
    expect(o.arms).toBe("two");
    if (o.arms === "two") expect(o.cells).toHaveLength(12);
    expect(Math.abs(o.predictiveProbability - byHand)).toBeLessThan(1e-12);
  });

  it("what it takes counts pending patients among the remaining ones and says so", () => {
    const w = whatItTakesForReview(single(2));
    expect(w.arms).toBe("single");
    if (w.arms === "single") {
      expect(w.remaining).toBe(20);
      expect(w.final?.sentence).toMatch(/among the remaining 20 patients \(2 of them are already enrolled, awaiting evaluation\)/);
    }
  });
});
