/**
 * The script generator's own contract (the numbers themselves are checked by running the scripts
 * with Rscript in tests/integration/reproduction-r.test.ts): every value the review reports at the
 * look is written as a check, numbers are written so R reads back the same double, and a review
 * that does not match its inputs is refused.
 */
import { describe, expect, it } from "vitest";
import type { SingleArmDesign, TwoArmDesign } from "@/lib/stats/types";
import { computeReview, type ReviewInput } from "./compute-review";
import { SINGLE_ARM_DEMO_DESIGN, TWO_ARM_DEMO_DESIGN } from "@/db/seeds/demo-designs";
import { REPRODUCTION_SCRIPT_HEADER, reproductionScript, reproductionScriptFileName } from "./reproduction-script";

// Variants of the demo designs: a robust mixture prior, 30 patients and efficacy stopping (one arm);
// a posterior rule with a margin, 30 per arm (two arms).
const single: SingleArmDesign = {
  ...SINGLE_ARM_DEMO_DESIGN,
  prior: { family: "robustMixture", mean: 0.25, ess: 8, weight: 0.7 },
  nMax: 30,
  looks: { kind: "list", sizes: [10, 20, 30] },
  rule: { ...SINGLE_ARM_DEMO_DESIGN.rule, efficacyStopping: true, efficacyThreshold: 0.99 },
};
const two: TwoArmDesign = {
  ...TWO_ARM_DEMO_DESIGN,
  delta: 0.05,
  nMaxPerArm: 30,
  looks: { kind: "list", sizes: [15, 30] },
  rule: { kind: "posterior", thetaT: 0.95, futilityThreshold: 0.1, efficacyStopping: false, efficacyThreshold: null },
};

function singleInput(): ReviewInput {
  return {
    design: single,
    arms: [{ id: 7, label: "Arm A", role: "single" }],
    looks: [
      { analysisId: 1, lookNumber: 1, cutoffDate: "2026-01-31", plannedN: 10, counts: [{ armId: 7, enrolled: 11, treated: 11, evaluable: 10, responders: 3, toxicities: 1 }] },
      { analysisId: 2, lookNumber: 2, cutoffDate: "2026-04-30", plannedN: 20, counts: [{ armId: 7, enrolled: 21, treated: 21, evaluable: 19, responders: 6, toxicities: 2 }] },
    ],
    analysisId: 2,
    generatedAt: "2026-05-01T00:00:00.000Z",
  };
}

describe("reproductionScript", () => {
  it("starts with the header, names the trial and look, carries the caution and every stored count", () => {
    const input = singleInput();
    const s = reproductionScript({ trialCode: "XYZ-9", input, review: computeReview(input), reviewVersion: 2 });
    expect(s.startsWith(`${REPRODUCTION_SCRIPT_HEADER}\n# Trial XYZ-9, look 2 (analysis 2, review version 2)`)).toBe(true);
    expect(s).toContain("the DMC charter, the protocol and the regulator decide");
    expect(s).toContain('list(1, "single", 10, 10, 3, 11, 1)');
    expect(s).toContain('list(2, "single", 20, 19, 6, 21, 2)');
    // The robust mixture is written as its two resolved components.
    expect(s).toMatch(/prior <- list\(w = c\(0\.7, 0\.30000000000000004\), a = c\(2, 1\), b = c\(6, 1\)\)/);
  });

  it("writes one check per reported value, with Cairn's numbers in round-trip form", () => {
    const input = singleInput();
    const review = computeReview(input);
    const s = reproductionScript({ trialCode: "XYZ-9", input, review });
    for (const name of ["single.posterior_mean", "single.credible_upper", "single.prob_above_p0", "look.predictive_probability", "look.safety_probability", "look.decision", "boundary.at_observed_n.futility_max", "boundary.at_planned_n.efficacy_min", "safety.boundary.at_planned_n.toxicity_min"])
      expect(s, name).toContain(`list("${name}", `);
    const mean = /list\("single\.posterior_mean", ([^,]+),/.exec(s)![1];
    expect(Number(mean)).toBe(review.arms[0].summary.mean);
    const pp = /list\("look\.predictive_probability", ([^,]+),/.exec(s)![1];
    expect(Number(pp)).toBe(review.current.evaluation.predictiveProbability);
  });

  it("covers a two-arm posterior rule: the difference probability and the monitoring probability", () => {
    const input: ReviewInput = {
      design: two,
      arms: [
        { id: 1, label: "E", role: "experimental" },
        { id: 2, label: "C", role: "control" },
      ],
      looks: [{ analysisId: 5, lookNumber: 1, cutoffDate: null, plannedN: 15, counts: [{ armId: 1, enrolled: 15, treated: null, evaluable: 15, responders: 8, toxicities: null }, { armId: 2, enrolled: 15, treated: null, evaluable: 14, responders: 4, toxicities: null }] }],
      analysisId: 5,
      generatedAt: "2026-05-01T00:00:00.000Z",
    };
    const s = reproductionScript({ trialCode: "XYZ-2", input, review: computeReview(input) });
    expect(s).toContain('list("two_arm.prob_difference_exceeds_delta", ');
    expect(s).toContain('list("look.monitoring_probability", ');
    expect(s).not.toContain('list("look.predictive_probability", ');
    expect(s).toContain('rule <- list(kind = "posterior"');
  });

  it("refuses a review whose look is not the last of the inputs", () => {
    const input = singleInput();
    const review = computeReview({ ...input, analysisId: 1 });
    expect(() => reproductionScript({ trialCode: "XYZ-9", input: { ...input, looks: input.looks.slice(1) }, review })).toThrow(/must end with the look under review/);
  });

  it("names the file from the trial code and look, nothing else", () => {
    expect(reproductionScriptFileName("CRN/305 x", 3)).toBe("CRN_305_x-look-3-reproduction.R");
  });
});
