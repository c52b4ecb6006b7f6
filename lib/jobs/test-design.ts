/**
 * A small single-arm design and calibration grid shared by the job tests (unit, worker threads and
 * MariaDB-backed): small enough for milliseconds, with feasible designs in the grid.
 */
import type { SingleArmDesign, TwoArmDesign } from "@/lib/stats/types";

export const smallDesign: SingleArmDesign = {
  arms: "single",
  prior: { family: "beta", a: 0.6, b: 0.4 },
  p0: 0.2,
  p1: 0.4,
  delta: 0,
  nMax: 30,
  looks: { kind: "every", first: 10, every: 5 },
  rule: { kind: "predictive", thetaT: 0.9, futilityThreshold: 0.05, efficacyStopping: true, efficacyThreshold: 0.99 },
  safety: null,
};

export const smallGrid = { thetaTGrid: [0.8, 0.85, 0.9, 0.95], thetaLGrid: [0, 0.05, 0.1], thetaUGrid: [0.95, 0.99], typeIErrorLimit: 0.15, powerTarget: 0.75, keep: 4 };

/** A small two-arm design and grid for the job tests: feasible designs, and thetaU values to split into chunks. */
export const smallTwoArmDesign: TwoArmDesign = {
  arms: "two",
  priorT: { family: "uniform" },
  priorC: { family: "uniform" },
  controlRate: 0.3,
  experimentalRate: 0.6,
  delta: 0,
  nMaxPerArm: 20,
  looks: { kind: "every", first: 10, every: 5 },
  rule: { kind: "predictive", thetaT: 0.9, futilityThreshold: 0.05, efficacyStopping: true, efficacyThreshold: 0.99 },
  safety: null,
};

export const smallTwoArmGrid = { thetaTGrid: [0.85, 0.9, 0.95], thetaLGrid: [0, 0.05, 0.1], thetaUGrid: [0.97, 0.99], typeIErrorLimit: 0.2, powerTarget: 0.5, keep: 4 };
