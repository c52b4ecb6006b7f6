/**
 * Finding 8: a probability equal to its threshold in exact arithmetic never triggers a strict rule,
 * whatever the floating-point rounding (product brief, "Conventions").
 *
 * The reference is exact rational arithmetic (BigInt), outside the engine: for integer shapes
 * P(Beta(a, b) > x) = P(Binomial(a + b - 1, x) <= a - 1) (exact identity between the Beta and
 * binomial tails), evaluated as a fraction for a decimal x. Beta(4, 1) above 0.5 is exactly
 * 15/16 = 0.9375. Other ties come from symmetry (two identical independent posteriors: P(X > Y) = 1/2
 * exactly) and from a predictive probability that is a sum of beta-binomial terms equal to 0.7.
 */
import { describe, expect, it } from "vitest";
import { TIE_TOLERANCE, exceedsThreshold, fallsBelowThreshold } from "./compare";
import { decideAtLook } from "./decision";
import { safetyBoundaries, singleArmBoundaries, twoArmBoundaries } from "./boundaries";
import { exactOperatingCharacteristics, singleArmOperatingCharacteristics } from "./operating-characteristics";
import { calibrateSingleArm } from "./calibration";
import { betaSurvival } from "./distributions";
import { simulateSingleArmTrials } from "./simulation";
import type { SingleArmDesign, TwoArmDesign } from "./types";

/** Exact P(Beta(a, b) > num/den) for integer a, b >= 1, as a reduced fraction [N, D]. */
function exactBetaSurvival(a: number, b: number, num: bigint, den: bigint): [bigint, bigint] {
  const n = a + b - 1;
  let choose = 1n;
  let sum = 0n;
  for (let j = 0; j <= a - 1; j++) {
    if (j > 0) choose = (choose * BigInt(n - j + 1)) / BigInt(j);
    sum += choose * num ** BigInt(j) * (den - num) ** BigInt(n - j);
  }
  const d = den ** BigInt(n);
  const g = gcd(sum, d);
  return [sum / g, d / g];
}
function gcd(x: bigint, y: bigint): bigint {
  while (y) [x, y] = [y, x % y];
  return x < 0n ? -x : x;
}
/** The fraction as a decimal string when it has at most `digits` decimals, else null. */
function asShortDecimal([n, d]: [bigint, bigint], digits: number): string | null {
  const scale = 10n ** BigInt(digits);
  if ((n * scale) % d !== 0n) return null;
  const v = (n * scale) / d;
  const s = v.toString().padStart(digits + 1, "0");
  return `${s.slice(0, -digits)}.${s.slice(-digits)}`;
}

const tieDesign: SingleArmDesign = {
  arms: "single",
  prior: { family: "uniform" },
  p0: 0.5,
  p1: 0.7,
  delta: 0,
  nMax: 3,
  looks: { kind: "list", sizes: [3] },
  rule: { kind: "predictive", thetaT: 0.9375, futilityThreshold: 0.05, efficacyStopping: false, efficacyThreshold: null },
  safety: null,
};

describe("finding 8: exact ties never trigger a strict rule", () => {
  it("finding 8: Beta(4,1) above 0.5 is exactly 15/16 (BigInt reference), and a final P equal to thetaT = 0.9375 is not success", () => {
    expect(exactBetaSurvival(4, 1, 1n, 2n)).toEqual([15n, 16n]);
    // 3 of 3 under a uniform prior: posterior Beta(4, 1).
    const r = decideAtLook(tieDesign, { n: 3, responders: 3 });
    expect(Math.abs(r.posteriorProbabilitySuccess - 0.9375)).toBeLessThan(1e-15);
    expect(r.decision).toMatchObject({ action: "final", success: false });
    expect(r.decision.reason).toContain("0.9375, not above the success threshold 0.9375");
    // Clearly above still triggers.
    const lower = { ...tieDesign, rule: { ...tieDesign.rule, thetaT: 0.9374 } };
    expect(decideAtLook(lower, { n: 3, responders: 3 }).decision).toMatchObject({ action: "final", success: true });
  });

  it("finding 8: the final boundary, the exact OC, calibration and simulation agree that the tie is no success", () => {
    const b = singleArmBoundaries(tieDesign).response;
    expect(b[b.length - 1]).toMatchObject({ final: true, efficacyMin: null, futilityMax: 3 });
    // No count succeeds, so P(declare success) is exactly 0 at any true rate.
    expect(singleArmOperatingCharacteristics(tieDesign, 0.9).pDeclareSuccess).toBe(0);
    // Lower thetaT below the tie: only 3 of 3 succeeds, so P(success) = p^3 (exact identity).
    const lower = { ...tieDesign, rule: { ...tieDesign.rule, thetaT: 0.93 } };
    expect(singleArmOperatingCharacteristics(lower, 0.9).pDeclareSuccess).toBeCloseTo(0.729, 14);
    const cal = calibrateSingleArm(tieDesign, { thetaTGrid: [0.93, 0.9375], thetaLGrid: [0], typeIErrorLimit: 0.99, powerTarget: 0.01 });
    expect(cal.typeIError[0]).toBeCloseTo(0.125, 14); // thetaT 0.93: 3 of 3 at p0 = 0.5
    expect(cal.typeIError[1]).toBe(0); // thetaT 0.9375: a tie, no success
    const sim = simulateSingleArmTrials(tieDesign, 0.9, { trials: 2000, seed: 8 });
    expect(sim.pDeclareSuccess).toBe(0);
  });

  it("finding 8: every short-decimal P(Beta(a,b) > p0) over integer shapes up to 12 is a tie (BigInt reference), and the comparison agrees with exact arithmetic elsewhere", () => {
    let ties = 0;
    let checked = 0;
    for (let a = 1; a <= 12; a++)
      for (let b = 1; b <= 12; b++)
        for (let tenth = 1; tenth <= 9; tenth++) {
          const exact = exactBetaSurvival(a, b, BigInt(tenth), 10n);
          const value = betaSurvival(tenth / 10, a, b);
          const dec = asShortDecimal(exact, 12);
          if (dec !== null) {
            ties++;
            const t = Number(dec);
            expect(exceedsThreshold(value, t), `Beta(${a},${b}) > ${tenth / 10} = ${dec}`).toBe(false);
            expect(fallsBelowThreshold(value, t), `Beta(${a},${b}) > ${tenth / 10} = ${dec}`).toBe(false);
          }
          // Thresholds on a 0.001 grid: wherever exact arithmetic puts the value clearly (more than
          // twice the tolerance) on one side, the engine agrees.
          for (let k = 1; k < 1000; k += 37) {
            const [n, d] = exact;
            const sign = n * 1000n - BigInt(k) * d; // sign of value - k/1000
            const gap = Math.abs(Number(n) / Number(d) - k / 1000);
            if (gap <= 2 * TIE_TOLERANCE) continue;
            checked++;
            expect(exceedsThreshold(value, k / 1000)).toBe(sign > 0n);
            expect(fallsBelowThreshold(value, k / 1000)).toBe(sign < 0n);
          }
        }
    expect(ties).toBeGreaterThan(40); // e.g. 0.9375, 0.0625, 0.75, 0.875, 0.512, 0.99, 0.999
    expect(checked).toBeGreaterThan(20_000);
  });

  it("finding 8: interim posterior-rule ties (1/16 at futility, 15/16 at efficacy) do not stop; values past the tolerance do", () => {
    const post: SingleArmDesign = {
      ...tieDesign,
      nMax: 10,
      looks: { kind: "list", sizes: [3] },
      rule: { kind: "posterior", thetaT: 0.9, futilityThreshold: 0.0625, efficacyStopping: true, efficacyThreshold: 0.9375 },
    };
    // 0 of 3: Beta(1, 4), P(p > 0.5) = 1/16; 3 of 3: Beta(4, 1), 15/16 (exact identity above).
    expect(exactBetaSurvival(1, 4, 1n, 2n)).toEqual([1n, 16n]);
    expect(decideAtLook(post, { n: 3, responders: 0 }).decision.action).toBe("continue");
    expect(decideAtLook(post, { n: 3, responders: 3 }).decision.action).toBe("continue");
    const row = singleArmBoundaries(post).response[0];
    expect(row).toMatchObject({ n: 3, futilityMax: null, efficacyMin: null });
    const moved = { ...post, rule: { ...post.rule, futilityThreshold: 0.0626, efficacyThreshold: 0.9374 } };
    expect(decideAtLook(moved, { n: 3, responders: 0 }).decision).toMatchObject({ action: "stop", stop: "futility" });
    expect(decideAtLook(moved, { n: 3, responders: 3 }).decision).toMatchObject({ action: "stop", stop: "efficacy" });
    expect(singleArmBoundaries(moved).response[0]).toMatchObject({ futilityMax: 0, efficacyMin: 3 });
  });

  it("finding 8: a predictive probability equal to 0.7 in exact arithmetic (sum of beta-binomial terms 0.3 + 0.4) ties thetaL and thetaU", () => {
    // Uniform prior, 1 of 1 so far, nMax 4, p0 0.5, thetaT 0.8: the final rule succeeds from 3 of 4
    // (P = 26/32 = 0.8125 by the exact identity) and not at 2 of 4 (1/2). Future Y ~ BetaBinomial(3, 2, 1):
    // P(Y = y) = (y + 1)/10, so PP = P(Y >= 2) = 0.3 + 0.4 = 0.7 exactly.
    expect(exactBetaSurvival(4, 2, 1n, 2n)).toEqual([13n, 16n]);
    expect(exactBetaSurvival(3, 3, 1n, 2n)).toEqual([1n, 2n]);
    const pp: SingleArmDesign = {
      ...tieDesign,
      nMax: 4,
      looks: { kind: "list", sizes: [1] },
      rule: { kind: "predictive", thetaT: 0.8, futilityThreshold: 0.7, efficacyStopping: false, efficacyThreshold: null },
    };
    const r = decideAtLook(pp, { n: 1, responders: 1 });
    expect(Math.abs((r.predictiveProbability as number) - 0.7)).toBeLessThan(1e-15);
    expect(r.decision.action).toBe("continue");
    const eff = { ...pp, rule: { ...pp.rule, futilityThreshold: 0.1, efficacyStopping: true, efficacyThreshold: 0.7 } };
    expect(decideAtLook(eff, { n: 1, responders: 1 }).decision.action).toBe("continue");
    // Boundary and OC: at n = 1 only 0 responders (PP = 0.1) is futile, so P(futility at look 1) = 1 - p.
    const b = singleArmBoundaries(pp).response;
    expect(b[0]).toMatchObject({ n: 1, futilityMax: 0 });
    expect(exactOperatingCharacteristics(b, 0.3).looks[0].pStopFutility).toBeCloseTo(0.7, 15);
    // Past the tolerance the rule triggers.
    const above = { ...pp, rule: { ...pp.rule, futilityThreshold: 0.7 + 1e-6 } };
    expect(decideAtLook(above, { n: 1, responders: 1 }).decision).toMatchObject({ action: "stop", stop: "futility" });
    const below = { ...eff, rule: { ...eff.rule, efficacyThreshold: 0.7 - 1e-6 } };
    expect(decideAtLook(below, { n: 1, responders: 1 }).decision).toMatchObject({ action: "stop", stop: "efficacy" });
  });

  it("finding 8: a safety probability of exactly 15/16 ties thetaS = 0.9375 (decision and safety boundary)", () => {
    const withSafety: SingleArmDesign = { ...tieDesign, nMax: 10, rule: { ...tieDesign.rule, thetaT: 0.9 }, safety: { qmax: 0.5, prior: { family: "uniform" }, thetaS: 0.9375 } };
    const r = decideAtLook(withSafety, { n: 3, responders: 3, toxicities: 3 });
    expect(Math.abs((r.safetyProbability as number) - 0.9375)).toBeLessThan(1e-15);
    expect(r.decision.action).toBe("continue");
    expect(r.decision.reason).toContain("No safety signal");
    expect(safetyBoundaries(withSafety.safety!, [3])[0].toxicityMin).toBeNull();
    const lower = { ...withSafety, safety: { ...withSafety.safety!, thetaS: 0.937 } };
    expect(decideAtLook(lower, { n: 3, responders: 3, toxicities: 3 }).decision).toMatchObject({ action: "stop", stop: "safety" });
    expect(safetyBoundaries(lower.safety!, [3])[0].toxicityMin).toBe(3);
  });

  it("finding 8: quadrature ties by symmetry: identical independent posteriors give P(X > Y) = 1/2 exactly (two-arm final rule, uncertain-standard rule)", () => {
    const two: TwoArmDesign = {
      arms: "two",
      priorT: { family: "uniform" },
      priorC: { family: "uniform" },
      controlRate: 0.3,
      experimentalRate: 0.5,
      delta: 0,
      nMaxPerArm: 12,
      looks: { kind: "list", sizes: [6] },
      rule: { kind: "posterior", thetaT: 0.5, futilityThreshold: 0.5, efficacyStopping: false, efficacyThreshold: null },
      safety: null,
    };
    for (let x = 0; x <= 12; x++) {
      const r = decideAtLook(two, { nT: 12, respondersT: x, nC: 12, respondersC: x });
      expect(r.decision).toMatchObject({ action: "final", success: false });
    }
    // Interim: xT = xC is a tie with pL = 0.5, so it is not futile; one fewer experimental responder is.
    const table = twoArmBoundaries(two);
    table.response[0].futilityMaxT.forEach((f, xC) => expect(f).toBe(xC === 0 ? null : xC - 1));
    table.response[1].efficacyMinT.forEach((e, xC) => expect(e).toBe(xC === 12 ? null : xC + 1));
    // Single arm against an uncertain standard equal to the posterior itself: P = 1/2, a tie.
    const ts: SingleArmDesign = {
      ...tieDesign,
      nMax: 20,
      looks: { kind: "list", sizes: [5] },
      rule: { kind: "uncertainStandard", standard: { a: 3, b: 4 }, thetaT: 0.9, futilityThreshold: 0.5, efficacyStopping: true, efficacyThreshold: 0.5 + 1e-3 },
    };
    // 2 of 5 under a uniform prior: Beta(3, 4), the standard's own law.
    expect(decideAtLook(ts, { n: 5, responders: 2 }).decision.action).toBe("continue");
    expect(decideAtLook({ ...ts, rule: { ...ts.rule, futilityThreshold: 0.5 + 1e-6 } }, { n: 5, responders: 2 }).decision).toMatchObject({ action: "stop", stop: "futility" });
  });
});
