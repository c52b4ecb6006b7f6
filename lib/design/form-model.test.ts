import { describe, expect, it } from "vitest";
import { defaultDesign, designToForm, fieldForIssuePath, formToCandidate, parseLookList, validateDesignCandidate } from "./form-model";
import { parseDesign } from "@/lib/stats/design-schema";
import type { Design } from "@/lib/stats/types";

const single: Design = {
  arms: "single",
  prior: { family: "robustMixture", mean: 0.25, ess: 12, weight: 0.7 },
  p0: 0.2,
  p1: 0.4,
  delta: 0,
  nMax: 40,
  looks: { kind: "list", sizes: [10, 20, 30, 40] },
  rule: { kind: "predictive", thetaT: 0.9, futilityThreshold: 0.05, efficacyStopping: true, efficacyThreshold: 0.99 },
  safety: { qmax: 0.3, prior: { family: "beta", a: 0.6, b: 1.4 }, thetaS: 0.9 },
};
const two: Design = {
  arms: "two",
  priorT: { family: "jeffreys" },
  priorC: { family: "informative", mean: 0.3, ess: 10 },
  controlRate: 0.3,
  experimentalRate: 0.5,
  delta: -0.05,
  nMaxPerArm: 60,
  looks: { kind: "every", first: 20, every: 20 },
  rule: { kind: "posterior", thetaT: 0.95, futilityThreshold: 0.1, efficacyStopping: false, efficacyThreshold: null },
  safety: null,
};

const uncertainSingle: Design = {
  ...single,
  delta: 0.05,
  rule: { kind: "uncertainStandard", standard: { a: 12, b: 36 }, thetaT: 0.9, futilityThreshold: 0.05, efficacyStopping: false, efficacyThreshold: null },
  safety: { kind: "uncertainStandard", standard: { a: 6, b: 24 }, margin: 0.1, prior: { family: "uniform" }, thetaS: 0.85 },
};
const uncertainTwo: Design = { ...two, rule: { ...two.rule, kind: "uncertainStandard" } } as Design;

describe("design form model", () => {
  for (const d of [single, two, defaultDesign("single"), defaultDesign("two"), uncertainSingle, uncertainTwo])
    it(`a ${d.arms}-arm design survives design -> form -> design unchanged`, () => {
      const back = validateDesignCandidate(formToCandidate(designToForm(d)));
      expect(back.ok).toBe(true);
      if (back.ok) expect(back.design).toEqual(parseDesign(d));
    });

  it("a blank number is reported next to its field, not as a form-wide error", () => {
    const f = designToForm(single);
    f.p0 = "";
    f.prior.ess = "abc";
    const r = validateDesignCandidate(formToCandidate(f));
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.errors.p0).toBe("p0 must be a number.");
      expect(r.errors["prior.ess"]).toMatch(/number/i);
    }
  });

  it("cross-field rules land on the field they concern", () => {
    const f = designToForm(single);
    f.p1 = "0.1";
    f.efficacyThreshold = "0.01";
    f.looksList = "10, 50";
    const r = validateDesignCandidate(formToCandidate(f));
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.errors.p1).toBe("p1 must be above p0.");
      expect(r.errors.efficacyThreshold).toBe("The efficacy threshold must be above the futility threshold.");
      expect(r.errors.looks).toBe("Every look must be at or below the maximum sample size.");
    }
  });

  it("efficacy stopping off sends a null efficacy threshold whatever was typed", () => {
    const f = designToForm(single);
    f.efficacyStopping = false;
    f.efficacyThreshold = "nonsense";
    const r = validateDesignCandidate(formToCandidate(f));
    expect(r.ok && r.design.rule.efficacyThreshold).toBe(null);
  });

  it("look lists accept commas, spaces and semicolons", () => {
    expect(parseLookList("10, 20 30;40")).toEqual([10, 20, 30, 40]);
    expect(parseLookList("10, x")).toEqual([10, NaN]);
  });

  it("maps schema paths to form fields", () => {
    expect(fieldForIssuePath(["rule", "thetaT"])).toBe("thetaT");
    expect(fieldForIssuePath(["looks", "sizes", 2])).toBe("looks");
    expect(fieldForIssuePath(["safety", "prior", "a"])).toBe("safetyPrior.a");
    expect(fieldForIssuePath(["priorC", "mean"])).toBe("priorC.mean");
    expect(fieldForIssuePath(["nMaxPerArm"])).toBe("nMaxPerArm");
    expect(fieldForIssuePath(["rule", "standard", "b"])).toBe("standardB");
    expect(fieldForIssuePath(["safety", "margin"])).toBe("safetyMargin");
    expect(fieldForIssuePath(["safety", "standard", "a"])).toBe("safetyStandardA");
  });

  it("finding 7: the uncertain-standard forms report a missing standard or margin next to their fields", () => {
    const f = designToForm(uncertainSingle);
    f.standardA = "";
    f.safetyMargin = "";
    const r = validateDesignCandidate(formToCandidate(f));
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.errors.standardA).toMatch(/number/i);
      expect(r.errors.safetyMargin).toMatch(/number/i);
    }
  });
});
