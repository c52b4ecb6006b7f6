/**
 * What the app exposes, read from the source tree: every page (page.tsx), every route handler
 * method (route.ts, per exported HTTP method) and every exported server action (a module whose
 * first statement is "use server"). tests/matrix/authorization-matrix-coverage.test.ts compares
 * this with the authorization matrix, so a new page, method or action without a row fails CI.
 *
 * Reads files only (no build, no server); node: modules only, so vitest and Playwright can both use it.
 */
import { readdirSync, readFileSync, statSync } from "node:fs";
import path from "node:path";

export const HTTP_METHODS = ["GET", "HEAD", "POST", "PUT", "PATCH", "DELETE", "OPTIONS"] as const;
export type HttpMethod = (typeof HTTP_METHODS)[number];

export type SurfaceEntry =
  | { kind: "page"; method: "GET"; route: string; file: string }
  | { kind: "api"; method: HttpMethod; route: string; file: string }
  | { kind: "action"; action: string; file: string };

function walk(dir: string): string[] {
  const out: string[] = [];
  for (const name of readdirSync(dir).sort()) {
    const full = path.join(dir, name);
    if (statSync(full).isDirectory()) out.push(...walk(full));
    else out.push(full);
  }
  return out;
}

/** "app/trials/[trialId]/(group)/page.tsx" → "/trials/[trialId]"; route groups and @slots leave the URL. */
export function routeOf(appRelativeDir: string): string {
  const segments = appRelativeDir.split(/[\\/]/).filter((s) => s && s !== "." && !/^\(.*\)$/.test(s) && !s.startsWith("@"));
  return "/" + segments.join("/");
}

/** The HTTP methods a route.ts exports, in any of the forms Next.js accepts. */
export function exportedMethods(source: string): HttpMethod[] {
  const found = new Set<HttpMethod>();
  const alt = HTTP_METHODS.join("|");
  for (const m of source.matchAll(new RegExp(`export\\s+(?:const|let|var|async\\s+function|function)\\s+(${alt})\\b`, "g"))) found.add(m[1] as HttpMethod);
  for (const block of source.matchAll(/export\s*\{([^}]*)\}/g)) {
    for (const part of block[1].split(",")) {
      const name = part.trim().split(/\s+as\s+/).pop()?.trim();
      if (name && (HTTP_METHODS as readonly string[]).includes(name)) found.add(name as HttpMethod);
    }
  }
  return HTTP_METHODS.filter((m) => found.has(m));
}

/** A module is a server-action module when its first statement (after comments) is the "use server" directive. */
export function isServerActionModule(source: string): boolean {
  const stripped = source.replace(/^(?:\s+|\/\/[^\n]*\n|\/\*[\s\S]*?\*\/)*/, "");
  return /^["']use server["']/.test(stripped);
}

/** Names of the functions a server-action module exports (each one is a public POST endpoint). */
export function exportedActionNames(source: string): string[] {
  const names = new Set<string>();
  for (const m of source.matchAll(/export\s+(?:async\s+)?function\s+([A-Za-z_$][\w$]*)/g)) names.add(m[1]);
  for (const m of source.matchAll(/export\s+const\s+([A-Za-z_$][\w$]*)\s*=/g)) names.add(m[1]);
  for (const block of source.matchAll(/export\s*\{([^}]*)\}/g)) {
    for (const part of block[1].split(",")) {
      const name = part.trim().split(/\s+as\s+/).pop()?.trim();
      if (name && name !== "type" && !part.trim().startsWith("type ")) names.add(name);
    }
  }
  if (/export\s+default\b/.test(source)) names.add("default");
  return [...names].sort();
}

/**
 * Enumerates the surface under `appDir`. Files are named relative to `rootDir` with forward
 * slashes (e.g. "app/admin/actions.ts"), which is how matrix rows name actions.
 */
export function enumerateAppSurface(rootDir: string, appDir = path.join(rootDir, "app")): SurfaceEntry[] {
  const entries: SurfaceEntry[] = [];
  for (const full of walk(appDir)) {
    const file = path.relative(rootDir, full).split(path.sep).join("/");
    const base = path.basename(full);
    const dir = path.relative(appDir, path.dirname(full));
    if (/\.test\.[jt]sx?$/.test(base)) continue;
    if (/^page\.(tsx|ts|jsx|js|mdx)$/.test(base)) {
      entries.push({ kind: "page", method: "GET", route: routeOf(dir), file });
      continue;
    }
    if (!/\.(tsx|ts|jsx|js|mjs)$/.test(base)) continue;
    const source = readFileSync(full, "utf8");
    if (/^route\.(ts|js|mjs)$/.test(base)) {
      for (const method of exportedMethods(source)) entries.push({ kind: "api", method, route: routeOf(dir), file });
    }
    if (isServerActionModule(source)) {
      for (const name of exportedActionNames(source)) entries.push({ kind: "action", action: `${file}#${name}`, file });
    }
  }
  return entries;
}

/** A Next.js route ("/trials/[trialId]") as a pattern over a matrix path ("/trials/{trial}/..."); query strings ignored. */
function routePattern(route: string): RegExp {
  const body = route
    .split("/")
    .map((seg) => {
      if (/^\[\[\.\.\..+\]\]$/.test(seg)) return "(?:/.*)?";
      if (/^\[\.\.\..+\]$/.test(seg)) return "/.+";
      if (/^\[.+\]$/.test(seg)) return "/[^/]+";
      return seg ? "/" + seg.replace(/[.*+?^${}()|[\]\\]/g, "\\$&") : "";
    })
    .join("");
  return new RegExp(`^${body || "/"}$`);
}
const staticSegments = (route: string) => route.split("/").filter((s) => s && !s.startsWith("[")).length;

/** The shape of a matrix row that coverage needs (see authorization-matrix.ts). */
export type CoverageRow = { kind: "page" | "api" | "action"; method: string; path: string; action?: string };

/**
 * The route a matrix path resolves to, as Next.js would route it: among the matching routes, the
 * one with the most static segments ("/trials/new" beats "/trials/[trialId]").
 */
export function resolveRoute(pathWithQuery: string, routes: string[]): string | undefined {
  const p = pathWithQuery.split("?")[0];
  const matching = routes.filter((r) => routePattern(r).test(p));
  return matching.sort((a, b) => staticSegments(b) - staticSegments(a))[0];
}

const keyOf = (e: SurfaceEntry) => (e.kind === "action" ? `action ${e.action}` : `${e.kind} ${e.method} ${e.route}`);

/** Surface entries with no matrix row, and matrix rows that name nothing in the app (stale rows). */
export function compareWithMatrix(surface: SurfaceEntry[], rows: CoverageRow[]): { missing: string[]; stale: string[] } {
  const pageRoutes = surface.filter((e) => e.kind === "page").map((e) => (e as { route: string }).route);
  const apiRoutes = [...new Set(surface.filter((e) => e.kind === "api").map((e) => (e as { route: string }).route))];
  const covered = new Set<string>();
  const stale: string[] = [];
  for (const row of rows) {
    let key: string | undefined;
    if (row.kind === "action") key = row.action ? `action ${row.action}` : undefined;
    else {
      const route = resolveRoute(row.path, row.kind === "page" ? pageRoutes : apiRoutes);
      key = route ? `${row.kind} ${row.method} ${route}` : undefined;
    }
    if (key && surface.some((e) => keyOf(e) === key)) covered.add(key);
    else stale.push(`${row.kind} ${row.method} ${row.action ?? row.path}`);
  }
  const missing = surface.map(keyOf).filter((k) => !covered.has(k));
  return { missing: [...new Set(missing)], stale };
}
