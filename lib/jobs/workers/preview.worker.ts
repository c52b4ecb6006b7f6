/**
 * Worker-thread entry (piscina): the design studio's preview (boundaries and exact operating
 * characteristics). Pure: imports only lib/design/preview and lib/stats, so it bundles for plain
 * Node into .workers/preview.worker.mjs.
 */
import { designPreview, type DesignPreview } from "@/lib/design/preview";
import type { Design } from "@/lib/stats/types";
import { captureOutcome, type WorkerOutcome } from "./worker-errors";
import { lowerThisThreadPriority } from "./lower-priority";

lowerThisThreadPriority();

type PreviewLabels = { arm?: string; experimental?: string; control?: string };
export type PreviewTask = { design: Design; labels: PreviewLabels };

export default function previewTask(task: PreviewTask): WorkerOutcome<DesignPreview> {
  return captureOutcome(() => designPreview(task.design, task.labels));
}
