/**
 * What it takes. Checked against (1) a brute-force search over every future outcome, deciding each
 * with the engine's `decideAtLook` (the predictive probability, or the posterior probability, at the
 * later look's counts) instead of the boundary table the module reads, for the two demo designs at
 * every look; (2) one small case worked by hand below.
 */
import { describe, expect, it } from "vitest";
import { decideAtLook } from "./decision";
import { expandLooks } from "./looks";
import type { Design, SingleArmDesign } from "./types";
import { singleArmWhatItTakes, twoArmWhatItTakes } from "./what-it-takes";
import { StatsDomainError } from "./validate";
import { SINGLE_ARM_DEMO_DESIGN, TWO_ARM_DEMO_DESIGN } from "@/db/seeds/demo-designs";


type Outcome = "futility" | "continue" | "efficacy";

/** The engine's decision at a look's counts, response rule only (the safety rule is not projected). */
function classify(design: Design, data: Parameters<typeof decideAtLook>[1]): Outcome {
  const d = decideAtLook({ ...design, safety: null } as Design, data).decision;
  if (d.action === "final") return d.success ? "efficacy" : "futility";
  if (d.action === "stop") return d.stop === "efficacy" ? "efficacy" : "futility";
  return "continue";
}

/** Smallest and largest y with the outcome, and whether the set of such y is an interval. */
function extremes(outcomes: Outcome[], want: Outcome): { min: number | null; max: number | null } {
  const ys = outcomes.flatMap((o, y) => (o === want ? [y] : []));
  if (ys.length) expect(ys[ys.length - 1] - ys[0] + 1).toBe(ys.length); // an interval: "at least k" is exact
  return { min: ys.length ? ys[0] : null, max: ys.length ? ys[ys.length - 1] : null };
}

describe("singleArmWhatItTakes", () => {
  it("equals a brute-force search with decideAtLook for the single-arm demo design, from every count", () => {
    const looks = expandLooks(SINGLE_ARM_DEMO_DESIGN.looks, SINGLE_ARM_DEMO_DESIGN.nMax);
    const memo = new Map<string, Outcome>();
    const at = (n: number, x: number) => {
      const k = `${n}:${x}`;
      if (!memo.has(k)) memo.set(k, classify(SINGLE_ARM_DEMO_DESIGN, { n, responders: x }));
      return memo.get(k)!;
    };
    let checked = 0;
    for (let n = 0; n < SINGLE_ARM_DEMO_DESIGN.nMax; n++)
      for (let x = 0; x <= n; x++) {
        const w = singleArmWhatItTakes(SINGLE_ARM_DEMO_DESIGN, { responders: x, evaluable: n });
        const later = looks.filter((L) => L > n);
        expect(w.looks.map((l) => l.n)).toEqual(later);
        expect(w.remaining).toBe(SINGLE_ARM_DEMO_DESIGN.nMax - n);
        w.looks.forEach((row) => {
          const outcomes = Array.from({ length: row.ahead + 1 }, (_, y) => at(row.n, x + y));
          expect(row.efficacyAtLeast).toBe(extremes(outcomes, "efficacy").min);
          expect(row.futilityAtMost).toBe(extremes(outcomes, "futility").max);
          checked++;
        });
        expect(w.final?.n).toBe(SINGLE_ARM_DEMO_DESIGN.nMax);
      }
    expect(checked).toBeGreaterThan(1000);
  });

  it("a posterior-probability rule with efficacy stopping also equals the brute-force search", () => {
    const d: SingleArmDesign = { ...SINGLE_ARM_DEMO_DESIGN, looks: { kind: "every", first: 8, every: 8 }, rule: { kind: "posterior", thetaT: 0.9, futilityThreshold: 0.1, efficacyStopping: true, efficacyThreshold: 0.98 }, safety: null };
    for (const [x, n] of [[0, 0], [2, 8], [5, 12], [9, 16], [1, 16], [12, 33]] as const) {
      const w = singleArmWhatItTakes(d, { responders: x, evaluable: n });
      for (const row of w.looks) {
        const outcomes = Array.from({ length: row.ahead + 1 }, (_, y) => classify(d, { n: row.n, responders: x + y }));
        expect(row.efficacyAtLeast).toBe(extremes(outcomes, "efficacy").min);
        expect(row.futilityAtMost).toBe(extremes(outcomes, "futility").max);
      }
    }
  });

  /*
   * Worked by hand. Uniform prior Beta(1, 1), p0 = 0.5, nMax = 6, looks at 2, 4, 6, thetaT = 0.9,
   * futility below 0.1, efficacy above 0.95.
   * Final rule: the posterior after x of 6 is Beta(x + 1, 7 - x), and P(p > 0.5) = P(Bin(7, 0.5) <= x)
   * (the beta-binomial tail identity). Cumulative counts of C(7, k) over 128: x = 4 gives 99/128 =
   * 0.773, x = 5 gives 120/128 = 0.9375 > 0.9. Success needs 5 or more of 6.
   * Look at 4, x4 responders, 2 patients to come: Y ~ BetaBinomial(2, x4 + 1, 5 - x4).
   *   x4 = 4: success needs Y >= 1; P(Y = 0) = B(5, 3) / B(5, 1) = (2! 5!) / 7! = 240 / 5040 = 1/21,
   *           PP = 20/21 = 0.952 > 0.95: efficacy.
   *   x4 = 3: needs Y = 2; P(Y = 2) = B(6, 2) / B(4, 2) = (5! 5!) / (7! 3!) = 14400 / 30240 = 10/21 = 0.476: continue.
   *   x4 = 2: needs Y >= 3, impossible: PP = 0 < 0.1: futility (and so for x4 < 2).
   * State: 1 responder of 2, one more patient enrolled and pending.
   *   Look at 4 (2 patients ahead): futility with x4 <= 2, i.e. 1 or fewer more responders; efficacy
   *   needs x4 = 4, i.e. 3 more among 2: out of reach.
   *   Final (4 patients ahead): 5 - 1 = 4 more responders, all of the remaining 4.
   */
  it("matches the case worked by hand", () => {
    const d: SingleArmDesign = {
      arms: "single",
      prior: { family: "uniform" },
      p0: 0.5,
      p1: 0.7,
      delta: 0,
      nMax: 6,
      looks: { kind: "list", sizes: [2, 4, 6] },
      rule: { kind: "predictive", thetaT: 0.9, futilityThreshold: 0.1, efficacyStopping: true, efficacyThreshold: 0.95 },
      safety: null,
    };
    const w = singleArmWhatItTakes(d, { responders: 1, evaluable: 2, pending: 1 });
    expect(w.looks.map((l) => [l.n, l.ahead, l.futilityMax, l.efficacyMin, l.futilityAtMost, l.efficacyAtLeast])).toEqual([
      [4, 2, 2, 4, 1, null],
      [6, 4, 4, 5, 3, 4],
    ]);
    expect(w.final?.sentence).toBe("At least 4 responders among the remaining 4 patients (1 of them is already enrolled, awaiting evaluation) are needed for the final analysis to succeed.");
    expect(w.looks[0].sentence).toContain("stops for futility with 1 or fewer responders among the next 2 patients");
    expect(w.looks[0].sentence).toContain("stopping for efficacy there is out of reach");
    // From 3 of 4 (the look at 4 done): success needs 5 - 3 = 2 more among the remaining 2.
    const later = singleArmWhatItTakes(d, { responders: 3, evaluable: 4 });
    expect(later.final?.efficacyAtLeast).toBe(2);
    expect(later.final?.sentence).toBe("At least 2 responders among the remaining 2 patients are needed for the final analysis to succeed.");
  });

  it("says so when the final analysis is already won or out of reach", () => {
    expect(singleArmWhatItTakes(SINGLE_ARM_DEMO_DESIGN, { responders: 20, evaluable: 30 }).final?.sentence).toMatch(/succeeds whatever the remaining 10 patients do/);
    expect(singleArmWhatItTakes(SINGLE_ARM_DEMO_DESIGN, { responders: 0, evaluable: 35 }).final?.sentence).toMatch(/^No outcome of the remaining 5 patients can make the final analysis succeed/);
    expect(singleArmWhatItTakes(SINGLE_ARM_DEMO_DESIGN, { responders: 10, evaluable: 40 }).final).toBeNull();
  });

  it("refuses counts outside the design", () => {
    expect(() => singleArmWhatItTakes(SINGLE_ARM_DEMO_DESIGN, { responders: 5, evaluable: 4 })).toThrow(StatsDomainError);
    expect(() => singleArmWhatItTakes(SINGLE_ARM_DEMO_DESIGN, { responders: 1, evaluable: 41 })).toThrow(StatsDomainError);
    expect(() => singleArmWhatItTakes(SINGLE_ARM_DEMO_DESIGN, { responders: 1, evaluable: 38, pending: 3 })).toThrow(StatsDomainError);
    expect(() => singleArmWhatItTakes(SINGLE_ARM_DEMO_DESIGN, { responders: 1, evaluable: 3, pending: -1 })).toThrow(StatsDomainError);
  });
});

describe("twoArmWhatItTakes", () => {
  it("equals a brute-force search with decideAtLook for the two-arm demo design, at every later look", () => {
    const memo = new Map<string, Outcome>();
    const at = (n: number, xT: number, xC: number) => {
      const k = `${n}:${xT}:${xC}`;
      if (!memo.has(k)) memo.set(k, classify(TWO_ARM_DEMO_DESIGN, { nT: n, respondersT: xT, nC: n, respondersC: xC }));
      return memo.get(k)!;
    };
    // The seeded look (9 of 20 against 5 of 20), states at each planned look, unequal arms, the start.
    const states = [
      [9, 20, 5, 20],
      [0, 0, 0, 0],
      [4, 20, 8, 20],
      [15, 20, 3, 20],
      [20, 40, 12, 40],
      [14, 40, 14, 40],
      [10, 21, 6, 19],
      [30, 45, 10, 41],
    ] as const;
    for (const [xT, nT, xC, nC] of states) {
      const w = twoArmWhatItTakes(TWO_ARM_DEMO_DESIGN, { respondersT: xT, evaluableT: nT, respondersC: xC, evaluableC: nC });
      expect(w.looks.map((l) => l.n)).toEqual([20, 40, 60].filter((L) => L > Math.max(nT, nC)));
      for (const row of w.looks) {
        for (let yC = 0; yC <= row.aheadC; yC++) {
          const outcomes = Array.from({ length: row.aheadT + 1 }, (_, yT) => at(row.n, xT + yT, xC + yC));
          expect([row.n, yC, row.efficacyAtLeastT[yC]]).toEqual([row.n, yC, extremes(outcomes, "efficacy").min]);
          expect([row.n, yC, row.futilityAtMostT[yC]]).toEqual([row.n, yC, extremes(outcomes, "futility").max]);
        }
      }
    }
  });

  it("gives the final analysis in a sentence, at the control arm's observed rate", () => {
    const w = twoArmWhatItTakes(TWO_ARM_DEMO_DESIGN, { respondersT: 9, evaluableT: 20, respondersC: 5, evaluableC: 20, pendingT: 1, pendingC: 2 });
    const f = w.final!;
    expect(f.aheadT).toBe(40);
    expect(f.expectedControl).toBe(10); // 5/20 of the 40 still to come
    const need = f.efficacyAtLeastT[10];
    expect(need).not.toBeNull();
    expect(f.sentence).toBe(
      `At the final analysis, if 10 control patients respond among the remaining 40 (2 of them are already enrolled, awaiting evaluation) (the control arm's observed rate), at least ${need} responders among the remaining 40 experimental patients (1 of them is already enrolled, awaiting evaluation) are needed to succeed.`,
    );
    // More control responders can only raise what the experimental arm needs.
    const needs = f.efficacyAtLeastT.map((v) => (v === null ? Infinity : v));
    for (let i = 1; i < needs.length; i++) expect(needs[i]).toBeGreaterThanOrEqual(needs[i - 1]);
  });
});
