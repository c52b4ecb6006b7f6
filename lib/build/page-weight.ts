/**
 * The page-weight check's pure part (scripts/page-weight.ts does the reading and gzipping): which
 * JavaScript files a page loads before anything else, read from the Next.js build's client reference
 * manifests, and the verdict against the budgets of issue 15 (every page's first-load JavaScript under
 * 250 KB gzipped; the chart library's lazily loaded chunk under 500 KB gzipped).
 *
 * A page's first load = the build manifest's rootMainFiles (the framework runtime every page needs)
 * plus every file listed in its route's `entryJSFiles` (its layouts, error and not-found boundaries,
 * and the page itself). Chunks loaded later through dynamic import() (the charts, the data grid) are
 * not in entryJSFiles, which is the point of loading them lazily.
 */
import vm from "node:vm";

/** 1 KB = 1,000 bytes here (the stricter reading of the budget). */
export const KB = 1000;
const PAGE_BUDGET_BYTES = 250 * KB;
const CHART_BUDGET_BYTES = 500 * KB;

type RscManifestEntry = { entryJSFiles?: Record<string, string[]> };

/**
 * Routes and their first-load files from one `page_client-reference-manifest.js` (a script that
 * assigns `globalThis.__RSC_MANIFEST[route] = {...}`). Run in an empty VM context: the file is our
 * own build's output, and it only assigns data.
 */
export function parseClientReferenceManifest(source: string): Map<string, string[]> {
  const context = vm.createContext({});
  vm.runInContext(source, context, { timeout: 1000 });
  const manifest = (context as { __RSC_MANIFEST?: Record<string, RscManifestEntry> }).__RSC_MANIFEST;
  if (!manifest || typeof manifest !== "object") throw new Error("not a client reference manifest: no __RSC_MANIFEST assigned");
  const out = new Map<string, string[]>();
  for (const [route, entry] of Object.entries(manifest)) {
    if (!entry.entryJSFiles) throw new Error(`client reference manifest of ${route} has no entryJSFiles`);
    const files = new Set<string>();
    for (const list of Object.values(entry.entryJSFiles)) for (const f of list) files.add(f);
    out.set(route, [...files]);
  }
  return out;
}

/** The files a route loads first: the root main files, then its own, each once. */
export function firstLoadFiles(rootMainFiles: readonly string[], routeFiles: readonly string[]): string[] {
  return [...new Set([...rootMainFiles, ...routeFiles])].filter((f) => f.endsWith(".js"));
}

export type RouteWeight = { route: string; gzipBytes: number; files: number };
export type ChunkWeight = { file: string; gzipBytes: number };

export function verdict(routes: RouteWeight[], chartChunks: ChunkWeight[], budgets = { page: PAGE_BUDGET_BYTES, chart: CHART_BUDGET_BYTES }): string[] {
  const problems: string[] = [];
  if (routes.length === 0) problems.push("no page routes found in the build: is this the right build folder?");
  for (const r of routes) if (r.gzipBytes > budgets.page) problems.push(`${r.route}: first-load JavaScript ${kb(r.gzipBytes)} gzipped, over the ${kb(budgets.page)} budget`);
  if (chartChunks.length === 0) problems.push("no chart chunk found in the build (is Plotly still loaded lazily?)");
  for (const c of chartChunks) if (c.gzipBytes > budgets.chart) problems.push(`chart chunk ${c.file}: ${kb(c.gzipBytes)} gzipped, over the ${kb(budgets.chart)} budget`);
  return problems;
}

export const kb = (bytes: number) => `${(bytes / KB).toFixed(1)} KB`;
