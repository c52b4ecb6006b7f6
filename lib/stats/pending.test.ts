/**
 * Pending outcomes: exact identities. Splitting the predictive probability over the pending
 * patients' outcomes (law of total probability) gives back the predictive probability at the
 * evaluable count, for a one-component prior and a robust mixture; the pending outcome's
 * probabilities are the beta-binomial predictive masses (checked by hand for a uniform prior).
 */
import { describe, expect, it } from "vitest";
import { pendingOutlookSingleArm, pendingOutlookTwoArm } from "./pending";
import { predictiveProbabilitySingleArm, predictiveProbabilityTwoArm, twoArmFinalRule } from "./predictive";
import { resolvePrior } from "./priors";
import { StatsDomainError } from "./validate";

describe("pendingOutlookSingleArm", () => {
  for (const [name, spec] of [
    ["Beta(0.6, 0.4)", { family: "beta", a: 0.6, b: 0.4 }],
    ["robust mixture", { family: "robustMixture", mean: 0.3, ess: 20, weight: 0.7 }],
  ] as const) {
    it(`sums back to the predictive probability now (${name})`, () => {
      const prior = resolvePrior(spec);
      for (const [x, n, p] of [[6, 20, 1], [6, 20, 4], [2, 12, 7], [15, 30, 9]] as const) {
        const o = pendingOutlookSingleArm({ prior, x, n, pending: p, nMax: 40, p0: 0.2, thetaT: 0.9 });
        const now = predictiveProbabilitySingleArm({ prior, x, n, nMax: 40, p0: 0.2, thetaT: 0.9 });
        expect(Math.abs(o.predictiveProbability - now)).toBeLessThan(1e-12);
        expect(o.rows.map((r) => r.responders)).toEqual(Array.from({ length: p + 1 }, (_, i) => i));
      }
    });
  }

  it("gives the beta-binomial masses: uniform prior, 1 of 2, 2 pending -> BetaBinomial(2, 2, 2) = 3/10, 4/10, 3/10 (worked by hand below)", () => {
    // Posterior Beta(2, 2); P(Z = z) = C(2, z) B(2 + z, 4 - z) / B(2, 2): z = 0: B(2, 4)/B(2, 2) = (1/20)/(1/6) = 3/10; z = 1: 2 B(3, 3)/B(2, 2) = 2 (1/30)(6) = 4/10.
    const o = pendingOutlookSingleArm({ prior: [{ weight: 1, a: 1, b: 1 }], x: 1, n: 2, pending: 2, nMax: 6, p0: 0.5, thetaT: 0.9 });
    expect(o.rows.map((r) => Number(r.probability.toFixed(12)))).toEqual([0.3, 0.4, 0.3]);
  });

  it("refuses more pending patients than there is room for", () => {
    expect(() => pendingOutlookSingleArm({ prior: [{ weight: 1, a: 1, b: 1 }], x: 1, n: 38, pending: 3, nMax: 40, p0: 0.2, thetaT: 0.9 })).toThrow(StatsDomainError);
  });
});

describe("pendingOutlookTwoArm", () => {
  it("sums back to the two-arm predictive probability now", () => {
    const priorT = resolvePrior({ family: "uniform" });
    const priorC = resolvePrior({ family: "informative", mean: 0.3, ess: 10 });
    const rule = twoArmFinalRule(priorT, priorC, 60, 0, 0.95);
    const o = pendingOutlookTwoArm({ priorT, priorC, xT: 9, nT: 20, pendingT: 3, xC: 5, nC: 20, pendingC: 2, finalRule: rule });
    const now = predictiveProbabilityTwoArm({ priorT, priorC, xT: 9, nT: 20, xC: 5, nC: 20, finalRule: rule });
    expect(o.cells).toHaveLength(12);
    expect(Math.abs(o.predictiveProbability - now)).toBeLessThan(1e-12);
  });
});
