import "server-only";
/**
 * The preview is asked for on every pause in typing, often for a design seen a moment ago (undo,
 * switching back): a small per-process LRU keyed by the design and labels avoids recomputing.
 */
import type { Design } from "@/lib/stats/types";
import { designPreview, type DesignPreview } from "./preview";

const MAX_ENTRIES = 32;
const store = ((globalThis as unknown as { cairnPreviewCache?: Map<string, DesignPreview> }).cairnPreviewCache ??= new Map());

export function cachedDesignPreview(design: Design, labels: { arm?: string; experimental?: string; control?: string }): DesignPreview {
  const key = JSON.stringify([design, labels]);
  const hit = store.get(key);
  if (hit) {
    store.delete(key);
    store.set(key, hit);
    return hit;
  }
  const value = designPreview(design, labels);
  store.set(key, value);
  if (store.size > MAX_ENTRIES) store.delete(store.keys().next().value as string);
  return value;
}
