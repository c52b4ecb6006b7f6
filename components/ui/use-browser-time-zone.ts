"use client";
import { useSyncExternalStore } from "react";

const noSubscription = () => () => {};
const browserZone = () => Intl.DateTimeFormat().resolvedOptions().timeZone || null;

/**
 * The reader's own IANA time zone, or null while rendering on the server (and during hydration),
 * so the server's zone never reaches the page. A store read, not an effect that sets state.
 */
export function useBrowserTimeZone(): string | null {
  return useSyncExternalStore(noSubscription, browserZone, () => null);
}
