/**
 * Page-weight check (issue 15): reads a finished Next.js build (NEXT_DIST_DIR, default .next-test,
 * or the folder given as the first argument), prints every page's first-load JavaScript gzipped and
 * the lazily loaded chart and grid chunks, and exits 1 when a page is over 250 KB or the chart chunk
 * over 500 KB (lib/build/page-weight.ts). A size check, not a timing. Sizes are gzip at level 9 of
 * the files as built.
 *
 *   NEXT_DIST_DIR=.next-test npx tsx scripts/page-weight.ts
 */
import { readFileSync, readdirSync, statSync } from "node:fs";
import path from "node:path";
import { gzipSync } from "node:zlib";
import { firstLoadFiles, kb, parseClientReferenceManifest, verdict, type ChunkWeight, type RouteWeight } from "../lib/build/page-weight";

const dist = path.resolve(process.argv[2] ?? process.env.NEXT_DIST_DIR ?? ".next-test");
const gz = new Map<string, number>();
function gzipBytes(file: string): number {
  let n = gz.get(file);
  if (n === undefined) {
    n = gzipSync(readFileSync(path.join(dist, file)), { level: 9 }).length;
    gz.set(file, n);
  }
  return n;
}

function walk(dir: string, out: string[] = []): string[] {
  for (const name of readdirSync(dir)) {
    const full = path.join(dir, name);
    if (statSync(full).isDirectory()) walk(full, out);
    else if (name === "page_client-reference-manifest.js") out.push(full);
  }
  return out;
}

const buildManifest = JSON.parse(readFileSync(path.join(dist, "build-manifest.json"), "utf8")) as { rootMainFiles?: string[] };
const root = buildManifest.rootMainFiles ?? [];
const routes: RouteWeight[] = [];
const firstLoad = new Set<string>();
for (const file of walk(path.join(dist, "server", "app"))) {
  for (const [route, files] of parseClientReferenceManifest(readFileSync(file, "utf8"))) {
    const all = firstLoadFiles(root, files);
    for (const f of all) firstLoad.add(f);
    routes.push({ route, files: all.length, gzipBytes: all.reduce((s, f) => s + gzipBytes(f), 0) });
  }
}
routes.sort((a, b) => b.gzipBytes - a.gzipBytes);

// Lazily loaded chunks, told apart by strings only their library has.
const chunkDir = path.join(dist, "static", "chunks");
const lazy = (marker: RegExp): ChunkWeight[] =>
  readdirSync(chunkDir)
    .filter((f) => f.endsWith(".js") && marker.test(readFileSync(path.join(chunkDir, f), "utf8")))
    .map((f) => ({ file: `static/chunks/${f}`, gzipBytes: gzipBytes(`static/chunks/${f}`) }));
const chart = lazy(/plotly_afterplot/);
const grid = lazy(/ag-root-wrapper/);

console.log(`Page weight of ${path.relative(process.cwd(), dist) || dist} (gzipped, level 9; budget ${kb(250_000)} per page, ${kb(500_000)} for the chart chunk)`);
console.log("First-load JavaScript by page:");
for (const r of routes) console.log(`  ${kb(r.gzipBytes).padStart(9)}  ${r.route}  (${r.files} files)`);
for (const c of chart) console.log(`Chart chunk (loaded after first paint): ${kb(c.gzipBytes)}  ${c.file}`);
for (const c of grid) console.log(`Grid chunk (loaded after first paint):  ${kb(c.gzipBytes)}  ${c.file}`);
const problems = verdict(routes, chart);
// Loaded lazily means in no page's first load.
for (const c of [...chart, ...grid]) if (firstLoad.has(c.file)) problems.push(`${c.file} is part of a page's first load; it must be loaded after first paint`);
if (problems.length) {
  console.error("Page weight over budget:");
  for (const p of problems) console.error(`  ${p}`);
  process.exit(1);
}
console.log("Page weight within budget.");
