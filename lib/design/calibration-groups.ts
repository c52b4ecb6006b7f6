/**
 * Best designs of a threshold search grouped by their operating characteristics: different
 * thresholds often cut the same boundaries (a PP table has finitely many values), so they are the
 * same design in every way that matters and are shown as one row listing every threshold set.
 * No imports beyond types, so the panel can use it on the client.
 */
import type { CalibratedDesign } from "@/lib/stats/calibration";

export type ThresholdSet = Pick<CalibratedDesign, "thetaT" | "thetaL" | "thetaU">;
type CalibrationGroup = { design: CalibratedDesign; thresholds: ThresholdSet[] };

/**
 * Operating characteristics closer than this are the same: the searches' arithmetic differs by
 * rounding only (about 1e-15) between threshold sets that give the same boundaries, and no two
 * different boundaries give type I error, power and average sample sizes all within 1e-12.
 */
const SAME_OC_TOLERANCE = 1e-12;

const OC_KEYS = ["typeIError", "power", "expectedSampleSizeNull", "expectedSampleSizeTarget", "pEarlyTerminationNull"] as const;

function sameCharacteristics(u: CalibratedDesign, v: CalibratedDesign): boolean {
  return OC_KEYS.every((k) => Math.abs(u[k] - v[k]) <= SAME_OC_TOLERANCE * Math.max(1, Math.abs(u[k])));
}

/** Groups in the order of their first member (the searches' order: smallest average sample size first). */
export function groupByCharacteristics(best: CalibratedDesign[]): CalibrationGroup[] {
  const groups: CalibrationGroup[] = [];
  for (const d of best) {
    const g = groups.find((x) => sameCharacteristics(x.design, d));
    const t = { thetaT: d.thetaT, thetaL: d.thetaL, thetaU: d.thetaU };
    if (g) g.thresholds.push(t);
    else groups.push({ design: d, thresholds: [t] });
  }
  return groups;
}
