import "server-only";
/**
 * The client address the sign-in throttle counts per. By default forwarding headers are ignored:
 * a client can write any X-Forwarded-For it likes. scripts/serve.mjs (the launcher) puts the
 * socket's peer address in PEER_HEADER, overwriting whatever the client sent. Behind one reverse
 * proxy that appends to X-Forwarded-For, set CAIRN_TRUSTED_PROXY=1: the last entry is then the
 * address the proxy saw (entries before it were written by the client and are not trusted).
 */
import { headers } from "next/headers";
import { config } from "@/lib/config";

export const PEER_HEADER = "x-cairn-peer";
/** Longer than any IPv6 address with a zone; a longer value is cut, not trusted further. */
const MAX_ADDRESS_LENGTH = 100;
/** Served without scripts/serve.mjs (next dev): every client shares this one address. */
export const UNKNOWN_ADDRESS = "unknown";

type HeaderSource = { get(name: string): string | null } | Record<string, unknown> | undefined;

function read(h: HeaderSource, name: string): string {
  if (!h) return "";
  if (typeof (h as { get?: unknown }).get === "function") return (h as { get(n: string): string | null }).get(name) ?? "";
  const v = (h as Record<string, unknown>)[name];
  return Array.isArray(v) ? String(v.at(-1) ?? "") : String(v ?? "");
}

export function clientAddress(h: HeaderSource, trustedProxy = config.trustedProxy()): string {
  if (trustedProxy) {
    const last = read(h, "x-forwarded-for").split(",").map((s) => s.trim()).filter(Boolean).at(-1);
    if (last) return last.slice(0, MAX_ADDRESS_LENGTH);
  }
  return (read(h, PEER_HEADER).trim() || UNKNOWN_ADDRESS).slice(0, MAX_ADDRESS_LENGTH);
}

/** The address of the request being served (server actions, route handlers); "unknown" outside one. */
export async function requestAddress(): Promise<string> {
  try {
    return clientAddress(await headers());
  } catch {
    return UNKNOWN_ADDRESS;
  }
}
