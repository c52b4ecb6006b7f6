#!/usr/bin/env node
/**
 * Bundles the worker-thread entries (lib/jobs/workers/*.worker.ts) into .workers/*.mjs, plain ES
 * modules that Node loads in a worker thread at run time. Runs before `next build` (package.json
 * "prebuild"); Turbopack bundles the server itself, so its output cannot be a worker's filename.
 *   node scripts/build-workers.mjs [--out DIR]
 */
import { build } from "esbuild";
import { readdirSync } from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..");

export async function buildWorkers(outDir = path.join(root, ".workers")) {
  const srcDir = path.join(root, "lib/jobs/workers");
  const entryPoints = readdirSync(srcDir)
    .filter((f) => f.endsWith(".worker.ts"))
    .map((f) => path.join(srcDir, f));
  await build({
    entryPoints,
    outdir: outDir,
    outExtension: { ".js": ".mjs" },
    bundle: true,
    platform: "node",
    format: "esm",
    target: "node20",
    alias: { "@": root },
    // The workers are pure computation; a server-side import slipping in must fail the build.
    external: ["server-only", "next", "knex", "mysql2"],
    logLevel: "warning",
  });
  return entryPoints.map((e) => path.join(outDir, path.basename(e).replace(/\.ts$/, ".mjs")));
}

if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  const i = process.argv.indexOf("--out");
  const files = await buildWorkers(i > 0 ? path.resolve(process.argv[i + 1]) : undefined);
  console.log(`[cairn] worker bundles: ${files.map((f) => path.relative(root, f)).join(", ")}`);
}
