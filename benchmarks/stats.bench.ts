/**
 * Benchmarks of the statistics engine: `npm run bench`. Each case builds its inputs outside the
 * timed loop, checks its result inside it (a wrong answer fails the run), and reports the median
 * of repeated runs against its target. Targets are ceilings to stay well under, not goals.
 */
import {
  calibrateSingleArm,
  calibrateTwoArm,
  posteriorSummary,
  clearTwoArmFinalRuleCache,
  exactOperatingCharacteristics,
  exactTwoArmOperatingCharacteristics,
  operatingCharacteristicsWithSafety,
  simulateBoundaryTable,
  singleArmBoundaries,
  twoArmBoundaries,
  type SingleArmDesign,
  type TwoArmDesign,
} from "../lib/stats/index";
import * as reference from "../lib/stats/reference/operating-characteristics";
import * as referenceBoundaries from "../lib/stats/reference/boundaries";
import * as referenceCalibration from "../lib/stats/reference/calibration";
import * as referenceCalibrationTwo from "../lib/stats/reference/calibration-two-arm";
import { designPreview } from "../lib/design/preview";

/** `reference`: median of the kept earlier implementation (lib/stats/reference) on the same case, same run. */
type Row = { name: string; median: number; target: number | null; runs: number; reference?: number };
const rows: Row[] = [];

function check(ok: boolean, what: string): void {
  if (!ok) throw new Error(`benchmark check failed: ${what}`);
}

function medianOf(runs: number, fn: () => void): number {
  fn(); // warm-up: compile the hot paths before timing
  const times: number[] = [];
  for (let i = 0; i < runs; i++) {
    const t0 = performance.now();
    fn();
    times.push(performance.now() - t0);
  }
  times.sort((a, b) => a - b);
  return times[Math.floor(times.length / 2)];
}

function bench(name: string, target: number | null, runs: number, fn: () => void): number {
  const median = medianOf(runs, fn);
  rows.push({ name, median, target, runs });
  return median;
}

/** The same case on the reference implementation (fewer runs: it is the slow one). */
function benchReference(runs: number, fn: () => void): void {
  rows[rows.length - 1].reference = medianOf(runs, fn);
}

// ---- posterior summaries incl. HPD, one arm ------------------------------------------------
await benchPosteriorSummaries();

// ---- boundary table + exact OC, single arm, Nmax 200, continuous monitoring from patient 10 --
const single200: SingleArmDesign = {
  arms: "single",
  prior: { family: "beta", a: 0.6, b: 0.4 },
  p0: 0.2,
  p1: 0.4,
  delta: 0,
  nMax: 200,
  looks: { kind: "every", first: 10, every: 1 },
  rule: { kind: "predictive", thetaT: 0.95, futilityThreshold: 0.05, efficacyStopping: true, efficacyThreshold: 0.99 },
  safety: null,
};
let exact200 = 0;
const sumsToOne = (oc: { looks: { pStopFutility: number; pStopEfficacy: number }[] }) => Math.abs(oc.looks.reduce((s, l) => s + l.pStopFutility + l.pStopEfficacy, 0) - 1) < 1e-12;
const exactMs = bench("boundary table + exact OC at p0 and p1, 1 arm, Nmax 200, every patient from 10", 1, 201, () => {
  const b = singleArmBoundaries(single200);
  const at0 = exactOperatingCharacteristics(b.response, single200.p0);
  const at1 = exactOperatingCharacteristics(b.response, single200.p1);
  check(b.response.length === 191 && sumsToOne(at0) && sumsToOne(at1) && at1.pDeclareSuccess > at0.pDeclareSuccess, "single-arm OC sums to one");
});
benchReference(11, () => {
  const b = referenceBoundaries.singleArmBoundaries(single200);
  reference.exactOperatingCharacteristics(b.response, single200.p0);
  reference.exactOperatingCharacteristics(b.response, single200.p1);
});
exact200 = exactOperatingCharacteristics(singleArmBoundaries(single200).response, 0.3).pDeclareSuccess;

const single1000: SingleArmDesign = { ...single200, nMax: 1000 };
bench("boundary table + exact OC at p0 and p1, 1 arm, Nmax 1000, every patient from 10", 50, 21, () => {
  const b = singleArmBoundaries(single1000);
  const at0 = exactOperatingCharacteristics(b.response, single1000.p0);
  const at1 = exactOperatingCharacteristics(b.response, single1000.p1);
  check(b.response.length === 991 && sumsToOne(at0) && sumsToOne(at1), "single-arm OC sums to one at Nmax 1000");
});
benchReference(1, () => {
  const b = referenceBoundaries.singleArmBoundaries(single1000);
  reference.exactOperatingCharacteristics(b.response, single1000.p0);
  reference.exactOperatingCharacteristics(b.response, single1000.p1);
});

// ---- the same OC by Monte Carlo, 100,000 trials --------------------------------------------
const table200 = singleArmBoundaries(single200).response;
const mcMs = bench("same OC by Monte Carlo, 100,000 trials (boundary table given)", null, 5, () => {
  const sim = simulateBoundaryTable(table200, 0.3, { trials: 100_000, seed: 12345 });
  check(Math.abs(sim.pDeclareSuccess - exact200) <= 4 * sim.standardErrors.pDeclareSuccess + 1e-12, "Monte Carlo within 4 SE of exact");
});

// ---- two arms, 100 per arm, a look every 10 per arm, exact OC at one pair -------------------
const two100: TwoArmDesign = {
  arms: "two",
  priorT: { family: "uniform" },
  priorC: { family: "uniform" },
  controlRate: 0.3,
  experimentalRate: 0.5,
  delta: 0,
  nMaxPerArm: 100,
  looks: { kind: "every", first: 10, every: 10 },
  rule: { kind: "predictive", thetaT: 0.95, futilityThreshold: 0.05, efficacyStopping: true, efficacyThreshold: 0.99 },
  safety: null,
};
const table100 = twoArmBoundaries(two100).response;
bench("exact OC at one rate pair, 2 arms, 100 per arm, look every 10 (boundary table given)", 2, 101, () => {
  const oc = exactTwoArmOperatingCharacteristics(table100, 0.5, 0.3);
  check(sumsToOne(oc) && oc.pDeclareSuccess > 0.5, "two-arm OC sums to one");
});
benchReference(21, () => reference.exactTwoArmOperatingCharacteristics(table100, 0.5, 0.3));
bench("boundaries + exact OC, 2 arms, 100 per arm, look every 10 (final table included)", 100, 7, () => {
  clearTwoArmFinalRuleCache();
  const b = twoArmBoundaries(two100);
  const oc = exactTwoArmOperatingCharacteristics(b.response, 0.5, 0.3);
  check(sumsToOne(oc) && oc.pDeclareSuccess > 0.5, "two-arm OC sums to one");
});
benchReference(3, () => {
  clearTwoArmFinalRuleCache();
  reference.exactTwoArmOperatingCharacteristics(referenceBoundaries.twoArmBoundaries(two100).response, 0.5, 0.3);
});

// ---- calibration, 40 x 40 grid, single arm, Nmax 100, continuous monitoring ----------------
const calib: SingleArmDesign = { ...single200, nMax: 100, looks: { kind: "every", first: 1, every: 1 }, rule: { ...single200.rule, efficacyStopping: false, efficacyThreshold: null } };
const grid = (lo: number, hi: number) => Array.from({ length: 40 }, (_, i) => lo + ((hi - lo) * i) / 39);
const thetaTGrid = grid(0.8, 0.995);
const thetaLGrid = grid(0, 0.3);
bench("calibration 40 x 40 grid, 1 arm, Nmax 100, every patient", 30, 21, () => {
  const r = calibrateSingleArm(calib, { thetaTGrid, thetaLGrid, typeIErrorLimit: 0.05, powerTarget: 0.8 });
  check(r.evaluated === 1600 && r.best.length > 0 && r.best[0].typeIError <= 0.05 && r.best[0].power >= 0.8, "calibration finds a feasible design");
});
benchReference(3, () => referenceCalibration.calibrateSingleArm(calib, { thetaTGrid, thetaLGrid, typeIErrorLimit: 0.05, powerTarget: 0.8 }));

// ---- two-arm threshold search: 40 x 40 grid, 100 per arm, a look every 10 per arm ---------------
// Type I error is the maximum over the 19 default control rates on the null boundary, power at (0.5, 0.3).
const calibTwo: TwoArmDesign = {
  arms: "two",
  priorT: { family: "uniform" },
  priorC: { family: "uniform" },
  controlRate: 0.3,
  experimentalRate: 0.5,
  delta: 0,
  nMaxPerArm: 100,
  looks: { kind: "every", first: 10, every: 10 },
  rule: { kind: "predictive", thetaT: 0.95, futilityThreshold: 0.05, efficacyStopping: false, efficacyThreshold: null },
  safety: null,
};
const twoGrid = (from: number, step: number) => Array.from({ length: 40 }, (_, i) => Math.round((from + i * step) * 1e9) / 1e9);
const twoOptions = { thetaTGrid: twoGrid(0.8, 0.005), thetaLGrid: twoGrid(0, 0.005), typeIErrorLimit: 0.1, powerTarget: 0.8 };
// The issues ask for "under a minute" (the two-arm search) and "seconds, not minutes" (the engine):
// a 20 s ceiling on the shared 2-core machine; measured about 10 s of CPU (13 s with the earlier engine).
bench("two-arm threshold search 40 x 40 grid, 100 per arm, look every 10 per arm", 20000, 3, () => {
  clearTwoArmFinalRuleCache();
  const r = calibrateTwoArm(calibTwo, twoOptions);
  check(r.evaluated === 1600 && r.best.length > 0 && r.best[0].typeIError <= 0.1 && r.best[0].power >= 0.8, "two-arm search finds a feasible design");
});
benchReference(1, () => {
  clearTwoArmFinalRuleCache();
  referenceCalibrationTwo.calibrateTwoArm(calibTwo, twoOptions);
});

// ---- uncertain-standard rule and safety: boundaries + joint OC over 13 toxicity rates -----------
const withSafety: SingleArmDesign = {
  ...single200,
  nMax: 100,
  looks: { kind: "every", first: 10, every: 5 },
  rule: { ...single200.rule, kind: "uncertainStandard", standard: { a: 20, b: 80 }, futilityThreshold: 0.05, efficacyThreshold: 0.99 },
  safety: { kind: "uncertainStandard", standard: { a: 10, b: 40 }, margin: 0.1, prior: { family: "beta", a: 0.5, b: 1.5 }, thetaS: 0.9 },
};
bench("uncertain standard + safety: boundaries + joint OC at 13 toxicity rates, 1 arm, Nmax 100, look every 5", 1000, 7, () => {
  const ocs = operatingCharacteristicsWithSafety(withSafety, 0.3, Array.from({ length: 13 }, (_, i) => i * 0.05));
  const total = ocs[6].looks.reduce((s, l) => s + l.pStopFutility + l.pStopEfficacy + l.pStopSafety, 0);
  check(Math.abs(total - 1) < 1e-12 && ocs[12].pSafetyStop > ocs[0].pSafetyStop, "joint OC with safety sums to one");
});

// ---- design preview, Nmax 200, every patient: boundaries, OC at p0 / p1 and the 51-rate curve ---
// The computation the design-preview route runs (in its worker thread); the route adds JSON and
// loopback HTTP, measured by scripts/preview-round-trip.ts against a running server.
bench("design preview computation, 1 arm, Nmax 200, every patient (boundaries, OC, curves)", 30, 21, () => {
  const p = designPreview(single200);
  check(p.arms === "single" && p.curve.length >= 51, "preview has its curve");
});

const pad = (s: string, n: number) => s + " ".repeat(Math.max(0, n - s.length));
const w = Math.max(...rows.map((r) => r.name.length));
console.log(`${pad("case", w)}  ${pad("median ms", 10)}  ${pad("target ms", 9)}  runs  ${pad("verdict", 11)}  reference ms (earlier engine, same run)  speed-up`);
for (const r of rows)
  console.log(
    `${pad(r.name, w)}  ${pad(r.median.toFixed(3), 10)}  ${pad(r.target === null ? "-" : String(r.target), 9)}  ${pad(String(r.runs), 4)}  ${pad(r.target === null ? "" : r.median < r.target ? "ok" : "OVER TARGET", 11)}  ${pad(r.reference === undefined ? "" : r.reference.toFixed(3), 38)}  ${r.reference === undefined ? "" : `${(r.reference / r.median).toFixed(1)}x`}`,
  );
console.log(`Monte Carlo (one rate) / exact (table + two rates) time ratio, Nmax 200 single arm: ${(mcMs / exactMs).toFixed(1)}`);
if (rows.some((r) => r.target !== null && r.median >= r.target)) process.exitCode = 1;

async function benchPosteriorSummaries(): Promise<void> {
  const prior = [{ weight: 1, a: 0.6, b: 0.4 }];
  const cases: [number, number][] = [
    [7, 23],
    [16, 23],
    [2, 40],
    [30, 60],
  ];
  let i = 0;
  // One summary per timed run (rotating through the cases); 2001 runs give a stable median.
  bench("posterior summaries incl. HPD, 1 arm (one summary)", 0.2, 2001, () => {
    const [x, n] = cases[i++ % cases.length];
    const s = posteriorSummary(prior, x, n, { level: 0.95, p0: 0.2 });
    const piece = s.hpd.pieces[0];
    check(piece.lower <= s.median && s.median <= s.hpd.pieces[s.hpd.pieces.length - 1].upper && Math.abs(s.hpd.mass - 0.95) < 1e-9, "HPD holds the median and 95%");
  });
  // A two-component mixture prior takes the general level-set HPD search (no closed form or
  // one-equation solve); shown for scale, no target.
  const mixturePrior = [
    { weight: 0.5, a: 0.6, b: 0.4 },
    { weight: 0.5, a: 2, b: 8 },
  ];
  let j = 0;
  bench("posterior summary, 2-component mixture prior (general HPD search)", null, 101, () => {
    const [x, n] = cases[j++ % cases.length];
    const s = posteriorSummary(mixturePrior, x, n, { level: 0.95, p0: 0.2 });
    check(Math.abs(s.hpd.mass - 0.95) < 1e-9, "mixture HPD holds 95%");
  });
}
