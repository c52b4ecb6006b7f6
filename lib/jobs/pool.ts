import "server-only";
/**
 * Worker-thread pools (piscina) for the CPU-heavy statistics, so a calibration or a large preview
 * does not hold the event loop that answers every other request.
 *
 * The worker files are the bundles scripts/build-workers.mjs writes to .workers/ before
 * `next build` (Turbopack bundles server code, and a worker thread needs a file plain Node can
 * load). Threads are used in production (`scripts/serve.mjs`, `next start`) or with CAIRN_WORKERS=on; under `next dev`
 * and the test runners the same function runs in this process, because a bundle left by an
 * earlier build would silently run yesterday's lib/stats. A production server whose bundle is
 * missing also falls back, with one log line; CAIRN_WORKERS=off forces the in-process path.
 */
import { existsSync } from "node:fs";
import path from "node:path";
import { Piscina } from "piscina";
import type { CalibrationResult } from "@/lib/stats/calibration";
import { designPreview, type DesignPreview } from "@/lib/design/preview";
import { calibrateSlice, type CalibrationSliceTask } from "./workers/calibration.worker";
import type { PreviewTask } from "./workers/preview.worker";
import { computeReviewJson, type ReviewTask } from "./workers/review.worker";
import { captureOutcome, unwrapOutcome, type WorkerOutcome } from "./workers/worker-errors";

type WorkerKind = "calibration" | "preview" | "review";

/**
 * Threads per pool. The build and demo machine has 2 cores: one calibration thread and one preview
 * thread leave the main thread a core's worth of time for requests most of the time.
 */
const MAX_THREADS: Record<WorkerKind, number> = { calibration: 1, preview: 1, review: 1 };
/** Idle threads exit after this long, so an idle server holds no extra memory. */
const IDLE_TIMEOUT_MS = 60_000;

function workersDir(): string {
  return process.env.CAIRN_WORKERS_DIR || path.join(process.cwd(), ".workers");
}

type PoolState = { pools: Map<string, Piscina>; warned: Set<string> };
const state: PoolState = ((globalThis as unknown as { cairnWorkerPools?: PoolState }).cairnWorkerPools ??= { pools: new Map(), warned: new Set() });

/** The pool for a worker kind, or null when its bundle is missing or workers are switched off. */
function poolFor(kind: WorkerKind): Piscina | null {
  const mode = process.env.CAIRN_WORKERS;
  if (mode === "off" || (mode !== "on" && process.env.NODE_ENV !== "production")) return null;
  const filename = path.join(workersDir(), `${kind}.worker.mjs`);
  const existing = state.pools.get(filename);
  if (existing) return existing;
  if (!existsSync(filename)) {
    if (!state.warned.has(filename)) {
      state.warned.add(filename);
      console.warn(`[cairn] ${filename} not found (run "node scripts/build-workers.mjs"); ${kind} work runs in the server process`);
    }
    return null;
  }
  const pool = new Piscina({ filename, minThreads: 0, maxThreads: MAX_THREADS[kind], idleTimeout: IDLE_TIMEOUT_MS });
  state.pools.set(filename, pool);
  return pool;
}

async function runTask<T, A>(kind: WorkerKind, task: A, inProcess: (task: A) => T): Promise<T> {
  const pool = poolFor(kind);
  const outcome: WorkerOutcome<T> = pool ? await pool.run(task) : captureOutcome(() => inProcess(task));
  return unwrapOutcome(outcome);
}

/** One slice of the calibration grid search, one arm or two (see lib/jobs/chunked-calibration.ts). */
export function runCalibrationSlice(task: CalibrationSliceTask): Promise<CalibrationResult> {
  return runTask("calibration", task, calibrateSlice);
}

export function runDesignPreview(task: PreviewTask): Promise<DesignPreview> {
  return runTask("preview", task, (t) => designPreview(t.design, t.labels));
}

/** The closed review of a locked look as JSON text (lib/review/review-cache.ts keeps it). */
export function runReviewComputation(task: ReviewTask): Promise<string> {
  return runTask("review", task, computeReviewJson);
}

/** Whether the worker bundle of a kind is in place (for tests and diagnostics). */
export function workerBundlePresent(kind: WorkerKind): boolean {
  return existsSync(path.join(workersDir(), `${kind}.worker.mjs`));
}

/** Tasks each running pool has completed in its threads (tests; diagnostics). */
export function workerTasksCompleted(kind: WorkerKind): number {
  return state.pools.get(path.join(workersDir(), `${kind}.worker.mjs`))?.completed ?? 0;
}

/** Stops every pool's threads (tests; a server process simply exits). */
export async function closeWorkerPools(): Promise<void> {
  const pools = [...state.pools.values()];
  state.pools.clear();
  await Promise.all(pools.map((p) => p.destroy()));
}
