/**
 * Blinding by construction, checked statically: the open queries and every project module that
 * the blinded-role pages and routes import (transitively) never name the closed tables or the
 * recommendation rationale. Comments are stripped first, so a module may still explain the rule.
 */
import { describe, expect, it } from "vitest";
import { existsSync, readFileSync } from "node:fs";
import path from "node:path";

const ROOT = path.resolve(__dirname, "../..");
const FORBIDDEN = ["analysis_arm_counts", "patient_outcomes", "rationale", "committee_votes", "tally_json", "review_cache"];
/** Modules that hold closed data by design; reaching one from blinded code is itself a failure. */
const CLOSED_MODULES = ["db/queries/closed.ts", "db/queries/recommendations.ts", "db/queries/committee-closed.ts", "lib/committee/votes.ts", "lib/review/load-review.ts", "lib/review/compute-review.ts", "lib/review/review-cache.ts"];

/** Entry points every blinded role (sponsor, coordinator, administrator without an unblinded role) reaches. */
const BLINDED_ENTRY_POINTS = [
  "db/queries/open-status.ts",
  "app/trials/[trialId]/page.tsx",
  "app/trials/[trialId]/layout.tsx",
  "app/trials/page.tsx",
  "app/api/trials/[trialId]/open-status/route.ts",
  "components/review/accrual-chart.tsx",
  // The audit trail as a blinded role reads it (page, JSON API and CSV from the same rows), and
  // the open packet's content.
  "app/trials/[trialId]/audit/page.tsx",
  "app/api/trials/[trialId]/audit/route.ts",
  "lib/packets/open-content.ts",
  // The meetings pages and their actions (a blinded coordinator organises meetings and makes the
  // open packet); the closed packet is prepared from the closed review instead.
  "app/trials/[trialId]/meetings/page.tsx",
  "app/trials/[trialId]/meetings/[meetingId]/page.tsx",
  "app/trials/[trialId]/meetings/actions.ts",
  "lib/packets/open-packet.ts",
  // The committee's open side: its make-up, a meeting's sessions, declarations, open minutes and the
  // letter to the sponsor (the letter's content is built from open facts only).
  "app/trials/[trialId]/committee/page.tsx",
  "app/trials/[trialId]/committee/actions.ts",
  "app/trials/[trialId]/meetings/[meetingId]/committee/page.tsx",
  "app/trials/[trialId]/meetings/[meetingId]/committee/actions.ts",
  "app/api/trials/[trialId]/meetings/[meetingId]/letter/route.ts",
  "lib/committee/letter.ts",
];

function stripComments(src: string): string {
  return src.replace(/\/\*[\s\S]*?\*\//g, "").replace(/(^|[^:"'`])\/\/.*$/gm, "$1");
}

function resolveImport(from: string, spec: string): string | null {
  let base: string;
  if (spec.startsWith("@/")) base = path.join(ROOT, spec.slice(2));
  else if (spec.startsWith(".")) base = path.resolve(path.dirname(from), spec);
  else return null; // a package from node_modules
  for (const cand of [base, `${base}.ts`, `${base}.tsx`, path.join(base, "index.ts"), path.join(base, "index.tsx")]) if (existsSync(cand) && !cand.endsWith("/")) try { readFileSync(cand); return cand; } catch { /* a folder */ }
  return null;
}

/** The project modules reachable from an entry point through static and dynamic imports. */
function importClosure(entry: string): string[] {
  const seen = new Set<string>();
  const stack = [path.join(ROOT, entry)];
  while (stack.length) {
    const file = stack.pop()!;
    if (seen.has(file)) continue;
    seen.add(file);
    const src = stripComments(readFileSync(file, "utf8"));
    for (const m of src.matchAll(/(?:import|export)\s[^;]*?from\s+["']([^"']+)["']|import\(\s*["']([^"']+)["']\s*\)|import\s+["']([^"']+)["']/g)) {
      const target = resolveImport(file, m[1] ?? m[2] ?? m[3]);
      if (target && !seen.has(target)) stack.push(target);
    }
  }
  return [...seen].map((f) => path.relative(ROOT, f));
}

/**
 * db/knex.ts reaches the knexfile and so the migrations, which create the closed tables; they run
 * only from the migrate script, never in a request, so they are not part of what a page can select.
 */
const SCHEMA_ONLY = (f: string) => f.startsWith("db/migrations/");

function offences(files: string[]): string[] {
  const out: string[] = [];
  for (const f of files.filter((x) => !SCHEMA_ONLY(x))) {
    if (CLOSED_MODULES.includes(f)) out.push(`${f} is a closed module`);
    const src = stripComments(readFileSync(path.join(ROOT, f), "utf8"));
    for (const word of FORBIDDEN) if (src.includes(word)) out.push(`${f} mentions ${word}`);
  }
  return out;
}

describe("blinded code cannot reach closed data", () => {
  it("the checker itself finds a closed module and the forbidden names (positive control)", () => {
    expect(offences(importClosure("db/queries/closed.ts"))).toEqual(expect.arrayContaining(["db/queries/closed.ts is a closed module", "db/queries/closed.ts mentions analysis_arm_counts", "db/queries/closed.ts mentions patient_outcomes"]));
    expect(importClosure("lib/review/load-review.ts")).toContain("db/queries/closed.ts");
  });

  it("the closed packet module does reach the closed queries (positive control for the meetings entries)", () => {
    expect(offences(importClosure("lib/packets/closed-packet.ts"))).toContain("db/queries/closed.ts is a closed module");
    expect(importClosure("app/trials/[trialId]/review/[analysisId]/packet-actions.ts")).toContain("db/queries/closed.ts");
  });

  for (const entry of BLINDED_ENTRY_POINTS) {
    it(`${entry} and everything it imports never name analysis_arm_counts, patient_outcomes or rationale`, () => {
      const files = importClosure(entry);
      expect(files).toContain(entry);
      expect(offences(files)).toEqual([]);
    });
  }

  it("the open status page reads only the open queries", () => {
    const files = importClosure("app/trials/[trialId]/page.tsx").filter((f) => f.startsWith("db/queries/"));
    expect(files).toContain("db/queries/open-status.ts");
    // lib/auth's own reads (accounts, roles, trials, API tokens) hold no arm-level data.
    for (const f of files) expect(["db/queries/open-status.ts", "db/queries/users.ts", "db/queries/memberships.ts", "db/queries/trials.ts", "db/queries/api-tokens.ts"]).toContain(f);
  });
});
