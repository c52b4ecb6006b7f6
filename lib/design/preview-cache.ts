import "server-only";
/**
 * The preview is asked for on every pause in typing, often for a design seen a moment ago (undo,
 * switching back): a small per-process LRU keyed by the design and labels avoids recomputing. The
 * computation runs in a worker thread (lib/jobs/pool.ts); the cache holds the pending promise, so
 * identical requests arriving together share one computation, and a failure is not cached.
 */
import type { Design } from "@/lib/stats/types";
import type { DesignPreview } from "./preview";
import { runDesignPreview } from "@/lib/jobs/pool";

const MAX_ENTRIES = 32;
const store = ((globalThis as unknown as { cairnPreviewCache?: Map<string, Promise<DesignPreview>> }).cairnPreviewCache ??= new Map());

export function cachedDesignPreview(design: Design, labels: { arm?: string; experimental?: string; control?: string }): Promise<DesignPreview> {
  const key = JSON.stringify([design, labels]);
  const hit = store.get(key);
  if (hit) {
    store.delete(key);
    store.set(key, hit);
    return hit;
  }
  const value = runDesignPreview({ design, labels });
  value.catch(() => {
    if (store.get(key) === value) store.delete(key);
  });
  store.set(key, value);
  if (store.size > MAX_ENTRIES) store.delete(store.keys().next().value as string);
  return value;
}
