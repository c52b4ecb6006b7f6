/**
 * Pending outcomes: patients enrolled by the data cut-off whose response is not yet known (they
 * will be evaluable, their assessment is not due or not yet recorded).
 *
 * Assumption (stated in DEVELOPERS.md and the methods text): a pending patient's response follows
 * the same posterior predictive distribution as any future patient's: outcomes are not missing for
 * a reason linked to the response, and being enrolled earlier says nothing about responding. Under
 * it the pending patients are simply the first of the nMax - n future patients, and the predictive
 * probability of success is unchanged by knowing how many are pending. What the pending count adds
 * is the near future: how the predictive probability will move once their outcomes arrive.
 *
 * `pendingOutlook*` gives, for each possible number of responders among the pending patients, its
 * predictive probability and the predictive probability once it is known. By the law of total
 * probability their weighted sum is the predictive probability now (the test checks it, and that
 * it equals moving the pending patients into the future by hand).
 *
 * Not used by the design studio: its operating characteristics count every patient as evaluable
 * when the look is held (exact, as before).
 */
import type { MixtureBeta } from "./types";
import { predictiveDistribution, predictiveProbabilitySingleArm, predictiveProbabilityTwoArm, type TwoArmFinalRule } from "./predictive";
import { requireCount, requireData, StatsDomainError } from "./validate";

export type PendingRow = {
  /** Responders among the pending patients. */
  responders: number;
  /** Its predictive probability given the data at the cut-off. */
  probability: number;
  /** The predictive probability of success once those outcomes are known. */
  predictiveProbability: number;
};

/**
 * Single arm, x responders of n evaluable, `pending` more enrolled without an outcome.
 * @param args.pending - integer, 0 <= pending <= nMax - n
 * @returns one row per z = 0..pending, and the weighted sum (the predictive probability now)
 */
export function pendingOutlookSingleArm(args: { prior: MixtureBeta; x: number; n: number; pending: number; nMax: number; p0: number; thetaT: number; finalSuccess?: Uint8Array }): {
  rows: PendingRow[];
  predictiveProbability: number;
} {
  const { prior, x, n, pending, nMax, p0, thetaT, finalSuccess } = args;
  requireData(x, n);
  requireCount("pending", pending);
  if (n + pending > nMax) throw new StatsDomainError("pending", pending, `plus the ${n} evaluable patients must not exceed nMax = ${nMax}`);
  const pmf = predictiveDistribution(prior, x, n, n + pending);
  const rows: PendingRow[] = [];
  let total = 0;
  for (let z = 0; z <= pending; z++) {
    const pp = predictiveProbabilitySingleArm({ prior, x: x + z, n: n + pending, nMax, p0, thetaT, finalSuccess });
    rows.push({ responders: z, probability: pmf[z], predictiveProbability: pp });
    total += pmf[z] * pp;
  }
  return { rows, predictiveProbability: Math.min(1, Math.max(0, total)) };
}

export type PendingCell = { respondersT: number; respondersC: number; probability: number; predictiveProbability: number };

/** Two arms: the same over (zT, zC), the arms' pending outcomes independent given the data. */
export function pendingOutlookTwoArm(args: {
  priorT: MixtureBeta;
  priorC: MixtureBeta;
  xT: number;
  nT: number;
  pendingT: number;
  xC: number;
  nC: number;
  pendingC: number;
  finalRule: TwoArmFinalRule;
}): { cells: PendingCell[]; predictiveProbability: number } {
  const { priorT, priorC, xT, nT, pendingT, xC, nC, pendingC, finalRule } = args;
  const N = finalRule.nMaxPerArm;
  requireData(xT, nT);
  requireData(xC, nC);
  requireCount("pendingT", pendingT);
  requireCount("pendingC", pendingC);
  if (nT + pendingT > N) throw new StatsDomainError("pendingT", pendingT, `plus the ${nT} evaluable patients must not exceed nMaxPerArm = ${N}`);
  if (nC + pendingC > N) throw new StatsDomainError("pendingC", pendingC, `plus the ${nC} evaluable patients must not exceed nMaxPerArm = ${N}`);
  const pmfT = predictiveDistribution(priorT, xT, nT, nT + pendingT);
  const pmfC = predictiveDistribution(priorC, xC, nC, nC + pendingC);
  const cells: PendingCell[] = [];
  let total = 0;
  for (let zC = 0; zC <= pendingC; zC++)
    for (let zT = 0; zT <= pendingT; zT++) {
      const pp = predictiveProbabilityTwoArm({ priorT, priorC, xT: xT + zT, nT: nT + pendingT, xC: xC + zC, nC: nC + pendingC, finalRule });
      const probability = pmfT[zT] * pmfC[zC];
      cells.push({ respondersT: zT, respondersC: zC, probability, predictiveProbability: pp });
      total += probability * pp;
    }
  return { cells, predictiveProbability: Math.min(1, Math.max(0, total)) };
}
