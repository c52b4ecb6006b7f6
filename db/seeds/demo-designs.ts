// The demo trials' designs: pure data with no database module, so unit and browser tests check the
// same designs the seed writes instead of copying them.
import type { SingleArmDesign, TwoArmDesign } from "@/lib/stats/types";

export const SINGLE_ARM_DEMO_DESIGN: SingleArmDesign = {
  arms: "single",
  prior: { family: "beta", a: 0.6, b: 0.4 },
  p0: 0.2,
  p1: 0.4,
  delta: 0,
  nMax: 40,
  looks: { kind: "list", sizes: [10, 20, 30, 40] },
  rule: { kind: "predictive", thetaT: 0.9, futilityThreshold: 0.05, efficacyStopping: false, efficacyThreshold: null },
  safety: { qmax: 0.3, prior: { family: "beta", a: 0.6, b: 1.4 }, thetaS: 0.9 },
};

export const TWO_ARM_DEMO_DESIGN: TwoArmDesign = {
  arms: "two",
  priorT: { family: "uniform" },
  priorC: { family: "informative", mean: 0.3, ess: 10 },
  controlRate: 0.3,
  experimentalRate: 0.5,
  delta: 0,
  nMaxPerArm: 60,
  looks: { kind: "list", sizes: [20, 40, 60] },
  rule: { kind: "predictive", thetaT: 0.95, futilityThreshold: 0.1, efficacyStopping: true, efficacyThreshold: 0.99 },
  safety: null,
};
