/**
 * Finding 7: Thall & Simon (1994, Biometrics 50:337-349) as published: monitoring with
 * P(pE > pS + delta | data) where the standard rate pS ~ Beta(aS, bS) is uncertain and independent
 * of pE; and the Thall, Simon & Estey (1995, Statistics in Medicine 14:357-379) safety form against
 * an uncertain standard toxicity rate qS plus a margin.
 *
 * Published worked example: none is checked here. We could not verify a number from either paper
 * on this machine and do not quote one from memory.
 *
 * References outside the engine: (1) a brute-force midpoint Riemann sum of
 * integral f_S(s) (1 - F_E(s + delta)) ds with stdlib-js beta-pdf and beta-cdf
 * (@stdlib/stats-base-dists-beta-pdf 0.3.1, -beta-cdf 0.2.3), 200,000 panels; (2) Monte Carlo by
 * inverse-CDF draws (50,000; stdlib-js beta-quantile with the mt19937 generator, @stdlib/random-base-mt19937),
 * a loose check within 4 standard errors; (3) the exact series for P(X > Y) between Betas with an
 * integer shape (delta = 0); (4) the limit identity: as aS + bS grows with mean p0, the rule tends to
 * the fixed-rate rule P(pE > p0 + delta), with an error that shrinks like 1/(aS + bS)
 * (second-order Taylor term of E[F(pS + delta)], exact reasoning, no source needed).
 */
import { describe, expect, it } from "vitest";
import betaCdf from "@stdlib/stats-base-dists-beta-cdf";
import betaPdf from "@stdlib/stats-base-dists-beta-pdf";
import betaQuantile from "@stdlib/stats-base-dists-beta-quantile";
import betaln from "@stdlib/math-base-special-betaln";
import mt19937 from "@stdlib/random-base-mt19937";
import { decideAtLook, safetyProbabilityFromPosterior, singleArmMonitoringProbability } from "./decision";
import { singleArmBoundaries, safetyBoundaries } from "./boundaries";
import { monitoringRuleLabel, safetyRuleLabel } from "./labels";
import { parseDesign, singleArmDesignSchema, twoArmDesignSchema } from "./design-schema";
import { singleArmOperatingCharacteristics } from "./operating-characteristics";
import type { SingleArmDesign, TwoArmDesign } from "./types";
import { StatsDomainError } from "./validate";

/** P(E > S + delta), E ~ Beta(aE, bE), S ~ Beta(aS, bS), by the midpoint rule over s. */
function riemann(aE: number, bE: number, aS: number, bS: number, delta: number, panels = 200_000): number {
  const lo = Math.max(0, -delta);
  const hi = Math.min(1, 1 - delta);
  const h = (hi - lo) / panels;
  let sum = delta < 0 ? betaCdf(-delta, aS, bS) : 0;
  for (let i = 0; i < panels; i++) {
    const s = lo + (i + 0.5) * h;
    sum += betaPdf(s, aS, bS) * (1 - betaCdf(s + delta, aE, bE)) * h;
  }
  return sum;
}

/** Exact P(X > Y), X ~ Beta(aT, bT) with integer aT, Y ~ Beta(aC, bC). */
function exactProbGreater(aT: number, bT: number, aC: number, bC: number): number {
  let s = 0;
  for (let i = 0; i < aT; i++) s += Math.exp(betaln(aC + i, bC + bT) - Math.log(bT + i) - betaln(1 + i, bT) - betaln(aC, bC));
  return s;
}

const design: SingleArmDesign = {
  arms: "single",
  prior: { family: "beta", a: 0.4, b: 0.6 },
  p0: 0.25,
  p1: 0.45,
  delta: 0.1,
  nMax: 40,
  looks: { kind: "every", first: 10, every: 10 },
  rule: { kind: "uncertainStandard", standard: { a: 25, b: 75 }, thetaT: 0.9, futilityThreshold: 0.05, efficacyStopping: true, efficacyThreshold: 0.95 },
  safety: null,
};

describe("finding 7: Thall & Simon (1994) monitoring against an uncertain standard rate", () => {
  it("finding 7: P(pE > pS + delta | data) equals a brute-force Riemann sum (stdlib-js pdf and cdf) to 1e-8", () => {
    for (const [x, n, delta] of [
      [8, 20, 0.1],
      [2, 10, -0.05],
    ]) {
      const post = [{ weight: 1, a: 0.4 + x, b: 0.6 + n - x }];
      const got = singleArmMonitoringProbability(post, { ...design, delta });
      expect(Math.abs(got - riemann(0.4 + x, 0.6 + n - x, 25, 75, delta))).toBeLessThan(1e-8);
    }
  });

  it("finding 7: delta = 0 with integer shapes equals the exact series for P(X > Y)", () => {
    const d = { ...design, delta: 0, prior: { family: "uniform" as const }, rule: { ...design.rule, standard: { a: 5, b: 12 } } };
    for (const [x, n] of [
      [2, 10],
      [5, 12],
      [9, 20],
    ]) {
      const got = decideAtLook(d, { n, responders: x }).posteriorProbabilityMonitoring as number;
      expect(Math.abs(got - exactProbGreater(1 + x, 1 + n - x, 5, 12))).toBeLessThan(1e-10);
    }
  });

  it("finding 7: agrees with Monte Carlo (inverse-CDF draws, stdlib-js beta-quantile, mt19937) within 4 standard errors", () => {
    const rand = mt19937.factory({ seed: 1994 });
    const u = () => (rand() + 0.5) / 4294967296;
    const draws = 50_000;
    let hits = 0;
    for (let i = 0; i < draws; i++) if (betaQuantile(u(), 8.4, 12.6) > betaQuantile(u(), 25, 75) + 0.1) hits++;
    const mc = hits / draws;
    const se = Math.sqrt((mc * (1 - mc)) / draws);
    const got = singleArmMonitoringProbability([{ weight: 1, a: 8.4, b: 12.6 }], design);
    expect(Math.abs(got - mc)).toBeLessThan(4 * se);
  });

  it("finding 7: with aS + bS -> infinity at mean p0 the rule tends to the fixed-rate rule P(p > p0 + delta), error shrinking like 1/(aS + bS)", () => {
    const post = [{ weight: 1, a: 6.4, b: 14.6 }];
    const fixed = singleArmMonitoringProbability(post, { ...design, rule: { ...design.rule, kind: "posterior", standard: null } });
    expect(Math.abs(fixed - (1 - betaCdf(0.35, 6.4, 14.6)))).toBeLessThan(1e-13);
    const errs = [1e2, 1e3, 1e4, 1e5].map((k) => Math.abs(singleArmMonitoringProbability(post, { ...design, rule: { ...design.rule, standard: { a: 0.25 * k, b: 0.75 * k } } }) - fixed));
    expect(errs[3]).toBeLessThan(2e-5);
    for (let i = 1; i < errs.length; i++) expect(errs[i - 1] / errs[i]).toBeGreaterThan(7); // about 10 per decade
    // The boundary table at a very concentrated standard equals the fixed-rate table.
    const tight = singleArmBoundaries({ ...design, rule: { ...design.rule, standard: { a: 25_000, b: 75_000 } } });
    const fixedTable = singleArmBoundaries({ ...design, rule: { ...design.rule, kind: "posterior", standard: null } });
    expect(tight.response).toEqual(fixedTable.response);
  });

  it("finding 7: an uncertain standard is more cautious than a fixed rate at its mean: a wider band of counts continues", () => {
    // Same mean 0.25, but pS uncertain: P(pE > pS + delta) is pulled towards 1/2 at both ends.
    const wide = singleArmBoundaries({ ...design, rule: { ...design.rule, standard: { a: 5, b: 15 } } }).response;
    const fixed = singleArmBoundaries({ ...design, rule: { ...design.rule, kind: "posterior", standard: null } }).response;
    for (let k = 0; k < wide.length - 1; k++) {
      expect(wide[k].futilityMax ?? -1).toBeLessThanOrEqual(fixed[k].futilityMax ?? -1);
      expect(wide[k].efficacyMin ?? Infinity).toBeGreaterThanOrEqual(fixed[k].efficacyMin ?? Infinity);
    }
    expect(wide.some((r, k) => r.futilityMax !== fixed[k].futilityMax || r.efficacyMin !== fixed[k].efficacyMin)).toBe(true);
  });

  it("finding 7: the decision names the uncertain standard; exact OCs run on the new rule (stops sum to one)", () => {
    const r = decideAtLook(design, { n: 10, responders: 1 });
    expect(r.decision).toMatchObject({ action: "stop", stop: "futility" });
    expect(r.decision.reason).toContain("uncertain standard rate (Beta(25, 75), mean 25.0%) plus 10.0 percentage points");
    const oc = singleArmOperatingCharacteristics(design, 0.35);
    const total = oc.looks.reduce((s, l) => s + l.pStopFutility + l.pStopEfficacy, 0);
    expect(total).toBeCloseTo(1, 13);
  });

  it("finding 7: only the uncertain-standard form carries the paper's name; the fixed-rate rule is called what it is", () => {
    expect(monitoringRuleLabel("posterior", "single")).toBe("Posterior probability against a fixed rate");
    expect(monitoringRuleLabel("posterior", "single")).not.toMatch(/Thall/);
    expect(monitoringRuleLabel("uncertainStandard", "single")).toMatch(/Thall & Simon 1994/);
    expect(safetyRuleLabel({ qmax: 0.3, prior: { family: "uniform" }, thetaS: 0.9 })).not.toMatch(/Thall/);
  });
});

describe("finding 7: Thall, Simon & Estey (1995) safety against an uncertain standard toxicity rate plus a margin", () => {
  const safety = { kind: "uncertainStandard" as const, standard: { a: 10, b: 40 }, margin: 0.1, prior: { family: "beta" as const, a: 0.5, b: 1.5 }, thetaS: 0.85 };
  it("finding 7: P(q > qS + margin | t of n) equals the Riemann sum (stdlib-js) to 1e-8", () => {
    for (const [t, n] of [
      [6, 12],
    ]) {
      const got = safetyProbabilityFromPosterior(safety, [{ weight: 1, a: 0.5 + t, b: 1.5 + n - t }]);
      expect(Math.abs(got - riemann(0.5 + t, 1.5 + n - t, 10, 40, 0.1))).toBeLessThan(1e-8);
    }
  });
  it("finding 7: tends to the fixed limit qmax = mean(qS) + margin as the standard concentrates; boundaries then match", () => {
    const post = [{ weight: 1, a: 4.5, b: 9.5 }];
    const fixed = safetyProbabilityFromPosterior({ qmax: 0.3, prior: safety.prior, thetaS: 0.85 }, post);
    const tight = safetyProbabilityFromPosterior({ ...safety, standard: { a: 20_000, b: 80_000 } }, post);
    expect(Math.abs(tight - fixed)).toBeLessThan(1e-4);
    const looks = [5, 10, 15, 20];
    expect(safetyBoundaries({ ...safety, standard: { a: 20_000, b: 80_000 } }, looks)).toEqual(safetyBoundaries({ qmax: 0.3, prior: safety.prior, thetaS: 0.85 }, looks));
  });
  it("finding 7: the decision stops for safety in words that name the standard and the margin", () => {
    const d: SingleArmDesign = { ...design, rule: { ...design.rule, kind: "predictive", standard: null }, safety };
    const r = decideAtLook(d, { n: 10, responders: 5, toxicities: 7 });
    expect(r.decision).toMatchObject({ action: "stop", stop: "safety" });
    expect(r.decision.reason).toContain("uncertain standard toxicity rate (Beta(10, 40), mean 20.0%) plus 10.0 percentage points");
    expect(safetyRuleLabel(safety)).toMatch(/Thall, Simon & Estey 1995/);
  });
});

describe("finding 7: design schema stays backwards compatible", () => {
  it("a stored spec without the new fields parses to exactly what was stored", () => {
    const stored = {
      arms: "single",
      prior: { family: "uniform" },
      p0: 0.2,
      p1: 0.4,
      delta: 0,
      nMax: 40,
      looks: { kind: "every", first: 10, every: 10 },
      rule: { kind: "posterior", thetaT: 0.9, futilityThreshold: 0.05, efficacyStopping: false, efficacyThreshold: null },
      safety: { qmax: 0.3, prior: { family: "beta", a: 0.6, b: 1.4 }, thetaS: 0.9 },
    };
    expect(parseDesign(stored)).toEqual(stored);
  });
  it("the new forms parse; missing pieces are reported at their fields", () => {
    expect(parseDesign({ ...design, safety: { kind: "uncertainStandard", standard: { a: 10, b: 40 }, margin: 0.1, prior: { family: "uniform" }, thetaS: 0.9 } })).toMatchObject({ rule: { kind: "uncertainStandard" } });
    const noStandard = singleArmDesignSchema.safeParse({ ...design, rule: { ...design.rule, standard: undefined } });
    expect(noStandard.success).toBe(false);
    expect(noStandard.error!.issues.map((i) => i.path.join("."))).toContain("rule.standard");
    const noMargin = singleArmDesignSchema.safeParse({ ...design, safety: { kind: "uncertainStandard", standard: { a: 10, b: 40 }, prior: { family: "uniform" }, thetaS: 0.9 } });
    expect(noMargin.error!.issues.map((i) => i.path.join("."))).toContain("safety.margin");
    const noQmax = singleArmDesignSchema.safeParse({ ...design, safety: { prior: { family: "uniform" }, thetaS: 0.9 } });
    expect(noQmax.error!.issues.map((i) => i.path.join("."))).toContain("safety.qmax");
  });
  it("a two-arm design may not carry its own standard (the control arm's posterior is the standard)", () => {
    const two = {
      arms: "two",
      priorT: { family: "uniform" },
      priorC: { family: "beta", a: 12, b: 28 },
      controlRate: 0.3,
      experimentalRate: 0.5,
      delta: 0,
      nMaxPerArm: 30,
      looks: { kind: "every", first: 10, every: 10 },
      rule: { kind: "uncertainStandard", thetaT: 0.9, futilityThreshold: 0.1, efficacyStopping: false, efficacyThreshold: null },
      safety: null,
    };
    expect(twoArmDesignSchema.safeParse(two).success).toBe(true);
    expect(twoArmDesignSchema.safeParse({ ...two, rule: { ...two.rule, standard: { a: 3, b: 7 } } }).success).toBe(false);
    const withStandard = { ...two, rule: { ...two.rule, standard: { a: 3, b: 7 } } } as unknown as TwoArmDesign;
    expect(() => decideAtLook(withStandard, { nT: 10, respondersT: 3, nC: 10, respondersC: 3 })).toThrow(StatsDomainError);
  });
  it("rejects in the engine: the uncertain-standard rule without a standard, and a safety margin outside (-1, 1)", () => {
    expect(() => decideAtLook({ ...design, rule: { ...design.rule, standard: null } }, { n: 10, responders: 1 })).toThrow(StatsDomainError);
    expect(() => decideAtLook({ ...design, safety: { kind: "uncertainStandard", standard: { a: 1, b: 1 }, margin: 1, prior: { family: "uniform" }, thetaS: 0.9 } }, { n: 10, responders: 1, toxicities: 1 })).toThrow(StatsDomainError);
  });
});
