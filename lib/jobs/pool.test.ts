import { execFileSync } from "node:child_process";
import { mkdtempSync, readdirSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { calibrateSingleArm } from "@/lib/stats/calibration";
import { StatsDomainError } from "@/lib/stats/validate";
import { designPreview } from "@/lib/design/preview";
import type { TwoArmDesign } from "@/lib/stats/types";
import { runChunkedCalibration } from "./chunked-calibration";
import { WORKER_NICENESS } from "./workers/lower-priority";
import { closeWorkerPools, runCalibrationSlice, runDesignPreview, runReviewComputation, workerBundlePresent, workerTasksCompleted } from "./pool";
import { computeReview } from "@/lib/review/compute-review";
import { reviewFromJson } from "@/lib/review/review-json";
import { smallDesign, smallGrid } from "@/lib/jobs/test-design";

// Builds the worker bundles exactly as `npm run build` does, into a folder of this test's own,
// and checks that work sent to the threads gives the same answers as the in-process functions.
const design = smallDesign;
const grid = smallGrid;

let outDir = "";
const previousDir = process.env.CAIRN_WORKERS_DIR;
const previousMode = process.env.CAIRN_WORKERS;

beforeAll(() => {
  outDir = mkdtempSync(path.join(tmpdir(), "cairn-workers-"));
  execFileSync(process.execPath, [path.resolve("scripts/build-workers.mjs"), "--out", outDir], { stdio: "pipe" });
  process.env.CAIRN_WORKERS_DIR = outDir;
  // Outside production the pool runs in process unless asked; this test is about the threads.
  process.env.CAIRN_WORKERS = "on";
}, 60_000);

afterAll(async () => {
  await closeWorkerPools();
  if (previousDir === undefined) delete process.env.CAIRN_WORKERS_DIR;
  else process.env.CAIRN_WORKERS_DIR = previousDir;
  if (previousMode === undefined) delete process.env.CAIRN_WORKERS;
  else process.env.CAIRN_WORKERS = previousMode;
  rmSync(outDir, { recursive: true, force: true });
});

describe("worker-thread pools", () => {
  it("the chunked search through the calibration thread finds the same best designs as one in-process search", async () => {
    expect(workerBundlePresent("calibration")).toBe(true);
    const before = workerTasksCompleted("calibration");
    const whole = calibrateSingleArm(design, grid);
    const viaWorker = await runChunkedCalibration(
      { design, ...grid },
      { calibrate: (d, options) => runCalibrationSlice({ design: d, options }), shouldCancel: () => false },
    );
    expect(whole.best.length).toBeGreaterThan(0);
    expect(viaWorker.best).toEqual(whole.best);
    expect(viaWorker.evaluated).toBe(whole.evaluated);
    expect(viaWorker.feasible).toBe(whole.feasible);
    // One task per thetaT slice ran in a thread, not the in-process fallback.
    expect(workerTasksCompleted("calibration") - before).toBe(grid.thetaTGrid.length);
  });

  it("the preview thread returns the in-process preview, single arm and two arms", async () => {
    const before = workerTasksCompleted("preview");
    expect(await runDesignPreview({ design, labels: { arm: "Invented arm" } })).toEqual(designPreview(design, { arm: "Invented arm" }));
    const two: TwoArmDesign = {
      arms: "two",
      priorT: { family: "beta", a: 1, b: 1 },
      priorC: { family: "beta", a: 1, b: 1 },
      controlRate: 0.3,
      experimentalRate: 0.5,
      delta: 0,
      nMaxPerArm: 20,
      looks: { kind: "every", first: 10, every: 10 },
      rule: { kind: "posterior", thetaT: 0.95, futilityThreshold: 0.1, efficacyStopping: true, efficacyThreshold: 0.99 },
      safety: null,
    };
    expect(await runDesignPreview({ design: two, labels: {} })).toEqual(designPreview(two, {}));
    expect(workerTasksCompleted("preview") - before).toBe(2);
  });

  it("the review thread returns the in-process closed review (as the JSON review_cache keeps)", async () => {
    expect(workerBundlePresent("review")).toBe(true);
    const before = workerTasksCompleted("review");
    const input = {
      design,
      arms: [{ id: 1, label: "Invented arm", role: "single" as const }],
      looks: [{ analysisId: 7, lookNumber: 1, cutoffDate: "2026-11-20", counts: [{ armId: 1, enrolled: 12, treated: null, evaluable: 12, responders: 5, toxicities: null }] }],
      analysisId: 7,
      generatedAt: "2026-12-04T22:00:00.000Z",
    };
    expect(reviewFromJson(await runReviewComputation({ input }))).toEqual(computeReview(input));
    expect(workerTasksCompleted("review") - before).toBe(1);
  });

  it.runIf(process.platform === "linux")("statistics threads run at the lowest scheduling priority, the request thread at its own", async () => {
    await runDesignPreview({ design, labels: {} });
    // /proc/self/task/<tid>/stat: field 19 is the thread's nice value (proc(5)). Threads stay alive
    // for the pool's idle timeout, so the preview thread is still there to read.
    const niceOf = (tid: string) => Number(readFileSync(`/proc/self/task/${tid}/stat`, "utf8").replace(/^.*\) /, "").split(" ")[16]);
    const nices = readdirSync("/proc/self/task").map(niceOf);
    expect(niceOf(String(process.pid))).toBeLessThan(WORKER_NICENESS);
    expect(nices).toContain(WORKER_NICENESS);
  });

  it("a domain error thrown in a thread arrives as a StatsDomainError (so the API answers 422, not 500)", async () => {
    const bad = { ...design, p0: 1.5 };
    const err = await runDesignPreview({ design: bad, labels: {} }).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(StatsDomainError);
    expect((err as StatsDomainError).argument).toBe("p0");
  });
});
