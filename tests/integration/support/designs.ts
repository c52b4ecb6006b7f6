/**
 * The small single-arm design the write-path tests lock on their own trials: a uniform prior, p0 0.2
 * against p1 0.4, 30 patients, the predictive rule without efficacy stopping. Small, so a lock and a
 * review take milliseconds; a test that needs other looks passes them.
 */
import type { SingleArmDesign } from "@/lib/stats/types";

export function smallSingleArmDesign(lookSizes: number[] = [10, 20, 30]): SingleArmDesign {
  return {
    arms: "single",
    prior: { family: "uniform" },
    p0: 0.2,
    p1: 0.4,
    delta: 0,
    nMax: 30,
    looks: { kind: "list", sizes: lookSizes },
    rule: { kind: "predictive", thetaT: 0.9, futilityThreshold: 0.05, efficacyStopping: false, efficacyThreshold: null },
    safety: null,
  };
}
