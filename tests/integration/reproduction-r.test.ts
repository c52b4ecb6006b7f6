/**
 * Reproduction outside Cairn: for every locked look of both demo trials, the closed review's R
 * script (downloaded through its route, as a DMC member would) is run with Debian's Rscript (base R
 * only; scripts/test installs r-base-core) and every difference it prints between R's value and
 * Cairn's must be at most 1e-8. R's pbeta, qbeta, lbeta and integrate are the outside reference.
 * A script whose Cairn value was altered must be caught, so the check can fail.
 */
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { execFileSync } from "node:child_process";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { seedDemo } from "@/db/seeds/demo";
import { GET as rScriptGet } from "@/app/api/trials/[trialId]/analyses/[analysisId]/review/r-script/route";
import { REPRODUCTION_SCRIPT_HEADER, REPRODUCTION_TOLERANCE, reproductionScript } from "@/lib/review/reproduction-script";
import { computeReview, type ReviewArm, type ReviewLook } from "@/lib/review/compute-review";
import type { Design, SingleArmDesign, TwoArmDesign } from "@/lib/stats/types";
import { actAs, currentClaims, currentSession, routeContext } from "./support/as-user";
import { db, resetDatabase } from "./support/db";

vi.mock("@/lib/auth/session", () => ({ sessionUserId: vi.fn(async () => currentSession()?.user.id ?? null), sessionClaims: vi.fn(() => currentClaims()) }));

const dir = mkdtempSync(path.join(tmpdir(), "cairn-r-"));
let dmcId: number;
let sponsorId: number;
let looks: { trialId: number; code: string; analysisId: number; lookNumber: number }[] = [];

beforeAll(async () => {
  await resetDatabase();
  await seedDemo();
  dmcId = (await db("users").where({ email: "dmc@cairn.example" }).first("id")).id;
  sponsorId = (await db("users").where({ email: "sponsor@cairn.example" }).first("id")).id;
  looks = await db("analyses as a")
    .join("trials as t", "t.id", "a.trial_id")
    .whereIn("a.status", ["locked", "reviewed"])
    .orderBy(["t.code", "a.look_number"])
    .select({ trialId: "t.id", code: "t.code", analysisId: "a.id", lookNumber: "a.look_number" });
});

afterAll(() => rmSync(dir, { recursive: true, force: true }));

async function download(trialId: number, analysisId: number): Promise<Response> {
  const url = `http://localhost/api/trials/${trialId}/analyses/${analysisId}/review/r-script`;
  return rScriptGet(new Request(url), routeContext({ trialId: String(trialId), analysisId: String(analysisId) }));
}

type Row = { name: string; r: string; cairn: string; difference: number };

/** Runs a script with Rscript and reads its comparison table. */
function runR(name: string, script: string): { rows: Row[]; stdout: string } {
  const file = path.join(dir, name);
  writeFileSync(file, script);
  const stdout = execFileSync("Rscript", ["--vanilla", file], { encoding: "utf8", timeout: 120_000 });
  const lines = stdout.split("\n");
  const start = lines.findIndex((l) => /^quantity\s+R\s+Cairn\s+difference$/.test(l));
  const end = lines.findIndex((l) => l.startsWith("largest difference:"));
  expect(start, stdout).toBeGreaterThanOrEqual(0);
  expect(end, stdout).toBeGreaterThan(start);
  const rows = lines.slice(start + 1, end).map((l) => {
    const f = l.trim().split(/\s+/);
    return { name: f[0], r: f[1], cairn: f[2], difference: Number(f[3]) };
  });
  return { rows, stdout };
}

describe("the closed review's R script", () => {
  it("reproduces every locked look of both demo trials within 1e-8", async () => {
    // The demo holds two locked looks of CRN-201 and one of CRN-305.
    expect(looks.map((l) => `${l.code}/${l.lookNumber}`)).toEqual(["CRN-201/1", "CRN-201/2", "CRN-305/1"]);
    actAs(dmcId);
    for (const l of looks) {
      const res = await download(l.trialId, l.analysisId);
      expect(res.status).toBe(200);
      expect(res.headers.get("content-disposition")).toContain(`${l.code}-look-${l.lookNumber}-reproduction.R`);
      expect(res.headers.get("cache-control")).toBe("no-store");
      const script = await res.text();
      expect(script.startsWith(REPRODUCTION_SCRIPT_HEADER)).toBe(true);
      const { rows, stdout } = runR(`${l.code}-${l.lookNumber}.R`, script);
      const names = rows.map((r) => r.name);
      // What the look must cover: posterior summaries per arm, the decision, the boundaries, and
      // the predictive probability (both demo designs use the predictive rule at an interim).
      expect(names).toContain("look.decision");
      expect(names).toContain("look.predictive_probability");
      expect(names).toContain("boundary.at_observed_n.futility_max");
      expect(names).toContain("boundary.at_planned_n.efficacy_min");
      if (l.code === "CRN-305") {
        expect(names).toEqual(expect.arrayContaining(["two_arm.prob_difference_exceeds_delta", "experimental.posterior_mean", "control.credible_upper"]));
      } else {
        expect(names).toEqual(expect.arrayContaining(["single.posterior_mean", "single.prob_above_p0", "look.safety_probability", "safety.boundary.at_observed_n.toxicity_min"]));
      }
      for (const r of rows) {
        expect(Number.isFinite(r.difference), `${l.code} look ${l.lookNumber}: ${r.name}\n${stdout}`).toBe(true);
        expect(r.difference, `${l.code} look ${l.lookNumber}: ${r.name} (R ${r.r}, Cairn ${r.cairn})`).toBeLessThanOrEqual(REPRODUCTION_TOLERANCE);
      }
      expect(stdout).toContain("RESULT: every value reproduced");
    }
  });

  it("flags a Cairn value that is off by more than the tolerance (the check can fail)", async () => {
    actAs(dmcId);
    const l = looks.find((x) => x.code === "CRN-305")!;
    const script = await (await download(l.trialId, l.analysisId)).text();
    // Move Cairn's two-arm probability by 1e-6 inside the script: R must report the difference.
    const tampered = script.replace(/list\("two_arm\.prob_difference_exceeds_delta", ([0-9.e-]+),/, (_m, v: string) => `list("two_arm.prob_difference_exceeds_delta", ${Number(v) + 1e-6},`);
    expect(tampered).not.toBe(script);
    const { rows, stdout } = runR("tampered.R", tampered);
    const row = rows.find((r) => r.name === "two_arm.prob_difference_exceeds_delta")!;
    expect(row.difference).toBeGreaterThan(REPRODUCTION_TOLERANCE);
    expect(row.difference).toBeLessThan(2e-6);
    expect(stdout).toContain("RESULT: some values differ");
    // A boundary count changed by one is caught as well.
    const tamperedCount = script.replace(/list\("boundary\.at_observed_n\.futility_max", (\d+),/, (_m, v: string) => `list("boundary.at_observed_n.futility_max", ${Number(v) + 1},`);
    expect(tamperedCount).not.toBe(script);
    expect(runR("tampered-count.R", tamperedCount).rows.find((r) => r.name === "boundary.at_observed_n.futility_max")!.difference).toBe(1);
  });

  it("is closed: a sponsor (blinded) is refused and gets no script", async () => {
    actAs(sponsorId);
    const l = looks[0];
    const res = await download(l.trialId, l.analysisId);
    expect(res.status).toBe(403);
    expect(await res.text()).not.toContain("Rscript");
    actAs(null);
    expect((await download(l.trialId, l.analysisId)).status).toBe(401);
  });
});

// Invented designs beyond the demo's, so the script's other branches are run too: mixture and
// Jeffreys priors, the uncertain-standard rule and safety form, the posterior rule with a negative
// margin, efficacy stopping, and final looks.
const SINGLE_MIX: SingleArmDesign = {
  arms: "single",
  prior: { family: "robustMixture", mean: 0.25, ess: 8, weight: 0.7 },
  p0: 0.2,
  p1: 0.4,
  delta: 0,
  nMax: 30,
  looks: { kind: "list", sizes: [10, 20, 30] },
  rule: { kind: "predictive", thetaT: 0.9, futilityThreshold: 0.05, efficacyStopping: true, efficacyThreshold: 0.99 },
  safety: { kind: "uncertainStandard", standard: { a: 3, b: 12 }, margin: 0.05, prior: { family: "beta", a: 0.6, b: 1.4 }, thetaS: 0.9 },
};
const SINGLE_STANDARD: SingleArmDesign = { ...SINGLE_MIX, prior: { family: "jeffreys" }, delta: 0.05, rule: { kind: "uncertainStandard", standard: { a: 4, b: 16 }, thetaT: 0.9, futilityThreshold: 0.05, efficacyStopping: true, efficacyThreshold: 0.95 }, safety: null };
const TWO_POSTERIOR: TwoArmDesign = {
  arms: "two",
  priorT: { family: "robustMixture", mean: 0.4, ess: 10, weight: 0.5 },
  priorC: { family: "informative", mean: 0.3, ess: 10 },
  controlRate: 0.3,
  experimentalRate: 0.5,
  delta: -0.05,
  nMaxPerArm: 30,
  looks: { kind: "list", sizes: [15, 30] },
  rule: { kind: "posterior", thetaT: 0.95, futilityThreshold: 0.1, efficacyStopping: true, efficacyThreshold: 0.99 },
  safety: null,
};
const TWO_PREDICTIVE: TwoArmDesign = { ...TWO_POSTERIOR, priorT: { family: "jeffreys" }, delta: 0.1, rule: { kind: "predictive", thetaT: 0.9, futilityThreshold: 0.1, efficacyStopping: true, efficacyThreshold: 0.95 } };
const ONE_ARM: ReviewArm[] = [{ id: 7, label: "Arm A", role: "single" }];
const ONE_ARM_LOOKS: ReviewLook[] = [
  { analysisId: 1, lookNumber: 1, cutoffDate: "2026-01-31", plannedN: 10, counts: [{ armId: 7, enrolled: 11, treated: 11, evaluable: 10, responders: 3, toxicities: 1 }] },
  { analysisId: 2, lookNumber: 2, cutoffDate: "2026-04-30", plannedN: 20, counts: [{ armId: 7, enrolled: 21, treated: 21, evaluable: 19, responders: 6, toxicities: 2 }] },
  { analysisId: 3, lookNumber: 3, cutoffDate: "2026-07-31", plannedN: 30, counts: [{ armId: 7, enrolled: 30, treated: 30, evaluable: 30, responders: 11, toxicities: 4 }] },
];
const TWO_ARMS: ReviewArm[] = [
  { id: 1, label: "E", role: "experimental" },
  { id: 2, label: "C", role: "control" },
];
const TWO_ARM_LOOKS: ReviewLook[] = [
  { analysisId: 5, lookNumber: 1, cutoffDate: null, plannedN: 15, counts: [{ armId: 1, enrolled: 15, treated: null, evaluable: 15, responders: 8, toxicities: null }, { armId: 2, enrolled: 15, treated: null, evaluable: 14, responders: 4, toxicities: null }] },
  { analysisId: 6, lookNumber: 2, cutoffDate: null, plannedN: 30, counts: [{ armId: 1, enrolled: 30, treated: null, evaluable: 30, responders: 14, toxicities: null }, { armId: 2, enrolled: 30, treated: null, evaluable: 30, responders: 9, toxicities: null }] },
];

describe("the R script beyond the demo designs", () => {
  const cases: [string, Design, ReviewArm[], ReviewLook[]][] = [
    ["single arm, robust mixture prior, uncertain-standard safety", SINGLE_MIX, ONE_ARM, ONE_ARM_LOOKS],
    ["single arm, uncertain-standard rule", SINGLE_STANDARD, ONE_ARM, ONE_ARM_LOOKS],
    ["two arms, posterior rule, negative margin", TWO_POSTERIOR, TWO_ARMS, TWO_ARM_LOOKS],
    ["two arms, predictive rule, positive margin", TWO_PREDICTIVE, TWO_ARMS, TWO_ARM_LOOKS],
  ];
  for (const [name, design, arms, allLooks] of cases)
    it(`reproduces every look within 1e-8: ${name}`, () => {
      for (const look of allLooks) {
        const input = { design, arms, looks: allLooks, analysisId: look.analysisId, generatedAt: "2026-08-01T00:00:00.000Z" };
        const { rows, stdout } = runR(`extra-${look.analysisId}.R`, reproductionScript({ trialCode: "INVENTED-1", input, review: computeReview(input) }));
        expect(rows.length).toBeGreaterThan(10);
        for (const r of rows) expect(r.difference, `${name}, look ${look.lookNumber}: ${r.name} (R ${r.r}, Cairn ${r.cairn})\n${stdout}`).toBeLessThanOrEqual(REPRODUCTION_TOLERANCE);
      }
    });
});
