// Dependencies run one way: app -> components -> lib -> db, with lib/stats depending on nothing of
// ours. A forgotten import the wrong way (a component reaching into a route folder, the database
// layer throwing HTTP errors) is how layers melt; this walks the real import graph and names each
// offending edge.
import { readdirSync, readFileSync, statSync } from "node:fs";
import path from "node:path";
import ts from "typescript";
import { describe, expect, it } from "vitest";

const ROOT = path.resolve(import.meta.dirname, "../..");
const LAYERS = ["app", "components", "lib", "db"] as const;

function sourceFiles(dir: string): string[] {
  const out: string[] = [];
  for (const name of readdirSync(dir)) {
    const full = path.join(dir, name);
    if (statSync(full).isDirectory()) out.push(...sourceFiles(full));
    else if (/\.(ts|tsx|mts)$/.test(name) && !name.endsWith(".d.ts")) out.push(full);
  }
  return out;
}

/** Project-relative target of an import, or null for packages and Node built-ins. */
function resolveImport(fromFile: string, spec: string): string | null {
  if (spec.startsWith("@/")) return path.normalize(spec.slice(2));
  if (spec.startsWith(".")) return path.relative(ROOT, path.resolve(path.dirname(fromFile), spec));
  return null;
}

export type ImportEdge = { from: string; to: string };

export function importEdges(): ImportEdge[] {
  const edges: ImportEdge[] = [];
  for (const layer of LAYERS) {
    for (const file of sourceFiles(path.join(ROOT, layer))) {
      const info = ts.preProcessFile(readFileSync(file, "utf8"), true, true);
      for (const ref of info.importedFiles) {
        const to = resolveImport(file, ref.fileName);
        if (to !== null) edges.push({ from: path.relative(ROOT, file), to });
      }
    }
  }
  return edges;
}

const under = (p: string, dir: string) => p === dir || p.startsWith(dir + "/");
const isTest = (p: string) => /\.test\.tsx?$/.test(p);

/** Why an edge is against the direction, or null when it is allowed. */
export function violation({ from, to }: ImportEdge): string | null {
  // The engine's tests may read the demo designs (pure data) to check the designs the seed writes.
  if (under(from, "lib/stats") && !under(to, "lib/stats") && !(isTest(from) && to === "db/seeds/demo-designs")) return "lib/stats is pure: it imports only lib/stats";
  if (under(from, "components") && (under(to, "app") || under(to, "db"))) return "components import neither app/ nor db/";
  if (under(from, "lib") && (under(to, "app") || under(to, "components"))) return "lib imports neither app/ nor components/";
  if (under(from, "db")) {
    const allowed = ["db", "lib/stats", "lib/domain", "lib/canonical-json", "lib/config-shared", "knexfile"];
    // Tests beside db code may use test support.
    if (isTest(from) && under(to, "tests")) return null;
    if (!allowed.some((d) => under(to, d))) return "db imports only db/, lib/stats and the pure shared modules (lib/domain, lib/canonical-json, lib/config-shared)";
  }
  return null;
}

describe("import direction", () => {
  const edges = importEdges();

  it("reads a real graph", () => {
    // A walker that found nothing would pass vacuously.
    expect(edges.length).toBeGreaterThan(500);
    expect(edges.some((e) => e.from.startsWith("app/") && e.to.startsWith("components/"))).toBe(true);
  });

  it("has no import against app -> components -> lib -> db", () => {
    const bad = edges.map((e) => ({ ...e, why: violation(e) })).filter((e) => e.why !== null);
    expect(bad.map((e) => `${e.from} -> ${e.to}: ${e.why}`)).toEqual([]);
  });

  it("flags each kind of wrong-way import", () => {
    expect(violation({ from: "components/x.tsx", to: "app/trials/[trialId]/actions" })).not.toBeNull();
    expect(violation({ from: "lib/mail/x.ts", to: "components/caution" })).not.toBeNull();
    expect(violation({ from: "db/knex.ts", to: "lib/http" })).not.toBeNull();
    expect(violation({ from: "lib/stats/x.ts", to: "lib/format" })).not.toBeNull();
    expect(violation({ from: "app/page.tsx", to: "db/queries/trials" })).toBeNull();
    expect(violation({ from: "lib/review/x.ts", to: "db/knex" })).toBeNull();
  });
});
