/**
 * Stopping boundaries. References outside the project: stdlib-js beta-cdf
 * (@stdlib/stats-base-dists-beta-cdf) for the final rule and for a Thall, Simon & Estey (1995)
 * style toxicity boundary; consistency with the decision at every count of every look.
 */
import { describe, expect, it } from "vitest";
import betaCdf from "@stdlib/stats-base-dists-beta-cdf";
import { safetyBoundaries, singleArmBoundaries, twoArmBoundaries } from "./boundaries";
import { decideAtLook } from "./decision";
import type { SingleArmDesign, TwoArmDesign } from "./types";
import { StatsDomainError } from "./validate";

const leeLiu: SingleArmDesign = {
  arms: "single",
  prior: { family: "beta", a: 0.6, b: 0.4 },
  p0: 0.2,
  p1: 0.4,
  delta: 0,
  nMax: 40,
  looks: { kind: "every", first: 10, every: 1 },
  rule: { kind: "predictive", thetaT: 0.9, futilityThreshold: 0.05, efficacyStopping: true, efficacyThreshold: 0.99 },
  safety: null,
};

function expectedAction(d: ReturnType<typeof decideAtLook>["decision"]): "futility" | "efficacy" | "continue" {
  if (d.action === "final") return d.success ? "efficacy" : "futility";
  if (d.action === "stop") return d.stop === "efficacy" ? "efficacy" : "futility";
  return "continue";
}

describe("single-arm boundaries", () => {
  it("the Lee & Liu (2008) style design (p0 0.2, Beta(0.6, 0.4), Nmax 40, thetaT 0.9): final success count by stdlib beta-cdf", () => {
    const b = singleArmBoundaries(leeLiu);
    const last = b.response[b.response.length - 1];
    let want = -1;
    for (let x = 40; x >= 0; x--) if (1 - betaCdf(0.2, 0.6 + x, 40.4 - x) > 0.9) want = x;
    expect(last).toEqual({ n: 40, final: true, futilityMax: want - 1, efficacyMin: want });
  });

  for (const kind of ["predictive", "posterior"] as const)
    it(`${kind} rule: the table agrees with decideAtLook at every count of every look`, () => {
      const d: SingleArmDesign = { ...leeLiu, rule: { ...leeLiu.rule, kind, futilityThreshold: kind === "posterior" ? 0.1 : 0.05 } };
      const b = singleArmBoundaries(d);
      expect(b.looks).toEqual(Array.from({ length: 31 }, (_, i) => 10 + i));
      for (const row of b.response)
        for (let x = 0; x <= row.n; x++) {
          const fromTable =
            row.futilityMax !== null && x <= row.futilityMax ? "futility"
            : row.efficacyMin !== null && x >= row.efficacyMin ? "efficacy"
            : row.final ? "futility"
            : "continue";
          expect(fromTable, `n=${row.n} x=${x}`).toBe(expectedAction(decideAtLook(d, { n: row.n, responders: x }).decision));
        }
    });

  it("null where no count stops: a futility threshold of 0 never stops, efficacy off never stops", () => {
    const d = { ...leeLiu, rule: { ...leeLiu.rule, futilityThreshold: 0, efficacyStopping: false, efficacyThreshold: null } };
    for (const row of singleArmBoundaries(d).response.slice(0, -1)) expect(row).toMatchObject({ futilityMax: null, efficacyMin: null });
  });
});

describe("safety boundaries (Thall, Simon & Estey 1995 style)", () => {
  // Invented example: toxicity prior Beta(0.6, 1.4) (mean 0.3, prior effective sample size 2),
  // qmax 0.3, thetaS 0.9, looks every 5 patients to 40.
  const rule = { qmax: 0.3, prior: { family: "beta" as const, a: 0.6, b: 1.4 }, thetaS: 0.9 };
  const looks = [5, 10, 15, 20, 25, 30, 35, 40];
  it("the smallest toxicity count with P(q > qmax | t of n) > thetaS, checked with stdlib beta-cdf", () => {
    const b = safetyBoundaries(rule, looks);
    for (const row of b) {
      const p = (t: number) => 1 - betaCdf(0.3, 0.6 + t, 1.4 + row.n - t);
      expect(row.toxicityMin).not.toBeNull();
      const t = row.toxicityMin!;
      expect(p(t), `n=${row.n} t=${t}`).toBeGreaterThan(0.9);
      if (t > 0) expect(p(t - 1), `n=${row.n} t=${t - 1}`).toBeLessThanOrEqual(0.9);
    }
    // Boundaries never fall as patients accrue (common practice, no source: a monitoring table reads this way).
    for (let k = 1; k < b.length; k++) expect(b[k].toxicityMin!).toBeGreaterThanOrEqual(b[k - 1].toxicityMin!);
  });
  it("null when no toxicity count can reach the threshold", () => {
    expect(safetyBoundaries({ ...rule, thetaS: 1 }, [5])).toEqual([{ n: 5, toxicityMin: null }]);
  });
  it("rejects: qmax must lie strictly between 0 and 1", () => {
    expect(() => safetyBoundaries({ ...rule, qmax: 0 }, looks)).toThrow(StatsDomainError);
  });
});

describe("two-arm boundaries", () => {
  const two: TwoArmDesign = {
    arms: "two",
    priorT: { family: "uniform" },
    priorC: { family: "beta", a: 3, b: 7 },
    controlRate: 0.3,
    experimentalRate: 0.55,
    delta: 0,
    nMaxPerArm: 16,
    looks: { kind: "every", first: 4, every: 4 },
    rule: { kind: "predictive", thetaT: 0.9, futilityThreshold: 0.1, efficacyStopping: true, efficacyThreshold: 0.95 },
    safety: null,
  };
  for (const kind of ["predictive", "posterior"] as const)
    it(`${kind} rule: the per-control-count table agrees with decideAtLook at every (xT, xC)`, () => {
      const d: TwoArmDesign = { ...two, rule: { ...two.rule, kind, futilityThreshold: kind === "posterior" ? 0.2 : 0.1 } };
      const b = twoArmBoundaries(d);
      expect(b.looks).toEqual([4, 8, 12, 16]);
      for (const row of b.response)
        for (let xC = 0; xC <= row.n; xC++)
          for (let xT = 0; xT <= row.n; xT++) {
            const f = row.futilityMaxT[xC];
            const e = row.efficacyMinT[xC];
            const fromTable = f !== null && xT <= f ? "futility" : e !== null && xT >= e ? "efficacy" : row.final ? "futility" : "continue";
            const dec = decideAtLook(d, { nT: row.n, respondersT: xT, nC: row.n, respondersC: xC }).decision;
            expect(fromTable, `n=${row.n} xT=${xT} xC=${xC}`).toBe(expectedAction(dec));
          }
    });
});
