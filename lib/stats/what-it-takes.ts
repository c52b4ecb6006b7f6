/**
 * "What would it take?": from the data at a look, the responders still needed among the patients
 * still to come for each later planned look to end in efficacy (at the final analysis: success),
 * and the most that still ends in futility, read from the locked design's boundary table.
 *
 * Counts are of the future only: `ahead` patients between this look's evaluable count and the
 * later look's planned size (patients enrolled but not yet evaluable at the cut-off are among them:
 * they have no outcome yet, so for the rule they are future patients). Boundaries are cumulative,
 * so the responders needed among the `ahead` patients are the boundary minus those already seen.
 *
 * The boundary rows say "stop at or below" and "at or above"; both stopping sets are intervals
 * (lib/stats/boundaries.ts), so "at least k more" is exact. The unit test checks every count against
 * a direct search with `decideAtLook`, which does not use the boundary table.
 *
 * The response rule only: a safety rule is watched on its own counts and is not projected here.
 * Decision support: the DMC charter, the protocol and the regulator decide.
 */
import type { SingleArmDesign, TwoArmDesign } from "./types";
import { singleArmBoundaries, twoArmBoundaries, type ResponseBoundary } from "./boundaries";
import { validateSingleArmDesign, validateTwoArmDesign } from "./decision";
import { requireCount, requireData, StatsDomainError } from "./validate";

/**
 * One later look of a single-arm trial, in counts still to come.
 * - `efficacyAtLeast`: the fewest responders among the `ahead` patients that reach the efficacy
 *   boundary (final look: success); null when no count among them does (out of reach, or no
 *   efficacy stopping at an interim). 0 means the boundary is already reached by the responders seen.
 * - `futilityAtMost`: the most responders among the `ahead` patients that still end in futility
 *   (final look: no success); null when no count among them does (futility is already out of the
 *   way). Equal to `ahead` when every outcome ends in futility.
 */
type LookAhead = {
  /** Planned look size (cumulative evaluable patients; per arm for two arms). */
  n: number;
  final: boolean;
  /** Patients still to come before that look. */
  ahead: number;
  futilityMax: number | null;
  efficacyMin: number | null;
  efficacyAtLeast: number | null;
  futilityAtMost: number | null;
  /** The same in a sentence a DMC member reads beside the numbers. */
  sentence: string;
};

export type SingleArmWhatItTakes = {
  arms: "single";
  responders: number;
  evaluable: number;
  pending: number;
  /** nMax minus the evaluable patients. */
  remaining: number;
  looks: LookAhead[];
  /** The final analysis row (also the last of `looks`); null at the final analysis itself. */
  final: LookAhead | null;
};

const plural = (k: number, one: string, many: string) => `${k} ${k === 1 ? one : many}`;

/** Responders among `ahead` still to come that put x + y at or above `min` (null: none can). */
function atLeastAmong(x: number, ahead: number, min: number | null): number | null {
  if (min === null) return null;
  const need = Math.max(0, min - x);
  return need <= ahead ? need : null;
}

/** Largest y in 0..ahead with x + y at or below `max` (null: no y). */
function atMostAmong(x: number, ahead: number, max: number | null): number | null {
  if (max === null || max < x) return null;
  return Math.min(ahead, max - x);
}

function pendingNote(pending: number): string {
  return pending > 0 ? ` (${plural(pending, "of them is", "of them are")} already enrolled, awaiting evaluation)` : "";
}

function singleArmSentence(row: Omit<LookAhead, "sentence">, pending: number): string {
  const among = `the ${row.ahead === 1 ? "next patient" : `next ${row.ahead} patients`}${pendingNote(Math.min(pending, row.ahead))}`;
  const amongRemaining = `the remaining ${plural(row.ahead, "patient", "patients")}${pendingNote(Math.min(pending, row.ahead))}`;
  if (row.final) {
    if (row.efficacyAtLeast === null) return `No outcome of ${amongRemaining} can make the final analysis succeed.`;
    if (row.efficacyAtLeast === 0) return `The final analysis succeeds whatever ${amongRemaining} do: the responders seen already meet the success criterion.`;
    return `At least ${row.efficacyAtLeast} ${row.efficacyAtLeast === 1 ? "responder" : "responders"} among ${amongRemaining} ${row.efficacyAtLeast === 1 ? "is" : "are"} needed for the final analysis to succeed.`;
  }
  const parts: string[] = [];
  const look = `the look at ${row.n} patients`;
  if (row.futilityAtMost === null) parts.push(`${cap(look)} cannot stop for futility whatever ${among} do`);
  else if (row.futilityAtMost >= row.ahead) parts.push(`${cap(look)} stops for futility whatever ${among} do`);
  else parts.push(`${cap(look)} stops for futility with ${row.futilityAtMost === 0 ? "no responder" : `${row.futilityAtMost} or fewer responders`} among ${among}; at least ${row.futilityAtMost + 1} ${row.futilityAtMost === 0 ? "is" : "are"} needed to continue`);
  if (row.efficacyMin === null && row.futilityAtMost === null) parts.push("and has no efficacy boundary");
  else if (row.efficacyMin === null) parts.push("(no efficacy stopping at this look)");
  else if (row.efficacyAtLeast === null) parts.push("stopping for efficacy there is out of reach");
  else parts.push(`${row.efficacyAtLeast === 0 ? "the efficacy boundary is already reached" : `${row.efficacyAtLeast} or more responders reach the efficacy boundary`}`);
  return `${parts[0]}${parts[1].startsWith("(") || parts[1].startsWith("and") ? " " : "; "}${parts[1]}.`;
}

function cap(s: string): string {
  return s.charAt(0).toUpperCase() + s.slice(1);
}

/**
 * What it takes for a single-arm trial with `responders` of `evaluable` patients.
 *
 * @param design - a valid single-arm design (its planned looks and rule)
 * @param state.responders, state.evaluable - 0 <= responders <= evaluable <= nMax
 * @param state.pending - enrolled but not yet evaluable at the cut-off (>= 0, at most nMax - evaluable);
 *   they are among the future patients and only change the wording
 * @returns one row per planned look after `evaluable` (the final analysis last; none at the final look itself)
 */
export function singleArmWhatItTakes(design: SingleArmDesign, state: { responders: number; evaluable: number; pending?: number }): SingleArmWhatItTakes {
  validateSingleArmDesign(design);
  const { responders: x, evaluable: n } = state;
  const pending = state.pending ?? 0;
  requireData(x, n);
  requireCount("pending", pending);
  if (n > design.nMax) throw new StatsDomainError("evaluable", n, `must not exceed nMax = ${design.nMax}`);
  if (n + pending > design.nMax) throw new StatsDomainError("pending", pending, `plus the ${n} evaluable patients must not exceed nMax = ${design.nMax}`);
  const table = singleArmBoundaries(design);
  const looks = table.response
    .filter((b) => b.n > n)
    .map((b) => lookAhead(b, x, n, pending));
  const last = looks[looks.length - 1];
  const final = last && last.final ? last : null;
  return { arms: "single", responders: x, evaluable: n, pending, remaining: design.nMax - n, looks, final };
}

function lookAhead(b: ResponseBoundary, x: number, n: number, pending: number): LookAhead {
  const ahead = b.n - n;
  const row = {
    n: b.n,
    final: b.final,
    ahead,
    futilityMax: b.futilityMax,
    efficacyMin: b.efficacyMin,
    efficacyAtLeast: atLeastAmong(x, ahead, b.efficacyMin),
    futilityAtMost: atMostAmong(x, ahead, b.futilityMax),
  };
  return { ...row, sentence: singleArmSentence(row, pending) };
}

// ---------------------------------------------------------------------------------------------
// Two arms
// ---------------------------------------------------------------------------------------------

/**
 * One later look of a two-arm trial (both arms at `n`): for each number of control responders
 * yC = 0..aheadC among the control patients still to come, the experimental responders needed
 * among the `aheadT` experimental patients still to come (`efficacyAtLeastT[yC]`, null when out of
 * reach or no efficacy stopping) and the most that still end in futility (`futilityAtMostT[yC]`,
 * null when none does). At the final look the efficacy entry is the success region's edge.
 */
export type TwoArmLookAhead = {
  n: number;
  final: boolean;
  aheadT: number;
  aheadC: number;
  efficacyAtLeastT: (number | null)[];
  futilityAtMostT: (number | null)[];
  /** The control responders among aheadC at the control arm's observed rate (rounded), the sentence's example. */
  expectedControl: number;
  sentence: string;
};

export type TwoArmWhatItTakes = {
  arms: "two";
  respondersT: number;
  evaluableT: number;
  pendingT: number;
  respondersC: number;
  evaluableC: number;
  pendingC: number;
  remainingT: number;
  remainingC: number;
  looks: TwoArmLookAhead[];
  /** null once a later look no longer exists (an arm is complete). */
  final: TwoArmLookAhead | null;
};

function twoArmSentence(row: Omit<TwoArmLookAhead, "sentence">, pendingT: number, pendingC: number, rateText: string): string {
  const yC = row.expectedControl;
  const ctrl = `if ${plural(yC, "control patient responds", "control patients respond")} among the ${row.final ? "remaining" : "next"} ${row.aheadC}${pendingNote(Math.min(pendingC, row.aheadC))} (${rateText})`;
  const expWho = `the ${row.final ? "remaining" : "next"} ${plural(row.aheadT, "experimental patient", "experimental patients")}${pendingNote(Math.min(pendingT, row.aheadT))}`;
  const eff = row.efficacyAtLeastT[yC];
  const fut = row.futilityAtMostT[yC];
  if (row.final) {
    if (eff === null) return `At the final analysis, ${ctrl}, no outcome of ${expWho} makes it succeed.`;
    if (eff === 0) return `At the final analysis, ${ctrl}, it succeeds whatever ${expWho} do.`;
    return `At the final analysis, ${ctrl}, at least ${plural(eff, "responder", "responders")} among ${expWho} ${eff === 1 ? "is" : "are"} needed to succeed.`;
  }
  const look = `At the look at ${row.n} patients per arm, ${ctrl}`;
  const futText =
    fut === null
      ? "it cannot stop for futility"
      : fut >= row.aheadT
        ? `it stops for futility whatever ${expWho} do`
        : `it stops for futility with ${fut === 0 ? "no responder" : `${fut} or fewer responders`} among ${expWho} (at least ${fut + 1} to continue)`;
  const effText = eff === null ? "efficacy is out of reach or not a stopping reason there" : eff === 0 ? "the efficacy boundary is already reached" : `${eff} or more reach the efficacy boundary`;
  return `${look}, ${futText}; ${effText}.`;
}

/**
 * What it takes for a two-arm trial: experimental `respondersT` of `evaluableT`, control
 * `respondersC` of `evaluableC`. Later looks are the planned looks above both arms' evaluable counts.
 *
 * @param design - a valid two-arm design
 * @param state - per-arm counts, 0 <= responders <= evaluable <= nMaxPerArm; pending per arm (>= 0,
 *   evaluable + pending <= nMaxPerArm) only changes the wording
 */
export function twoArmWhatItTakes(
  design: TwoArmDesign,
  state: { respondersT: number; evaluableT: number; respondersC: number; evaluableC: number; pendingT?: number; pendingC?: number },
): TwoArmWhatItTakes {
  validateTwoArmDesign(design);
  const N = design.nMaxPerArm;
  const { respondersT: xT, evaluableT: nT, respondersC: xC, evaluableC: nC } = state;
  const pendingT = state.pendingT ?? 0;
  const pendingC = state.pendingC ?? 0;
  requireData(xT, nT);
  requireData(xC, nC);
  requireCount("pendingT", pendingT);
  requireCount("pendingC", pendingC);
  if (nT > N) throw new StatsDomainError("evaluableT", nT, `must not exceed nMaxPerArm = ${N}`);
  if (nC > N) throw new StatsDomainError("evaluableC", nC, `must not exceed nMaxPerArm = ${N}`);
  if (nT + pendingT > N) throw new StatsDomainError("pendingT", pendingT, `plus the ${nT} evaluable patients must not exceed nMaxPerArm = ${N}`);
  if (nC + pendingC > N) throw new StatsDomainError("pendingC", pendingC, `plus the ${nC} evaluable patients must not exceed nMaxPerArm = ${N}`);
  const table = twoArmBoundaries(design);
  const rateC = nC > 0 ? xC / nC : design.controlRate;
  const rateText = nC > 0 ? "the control arm's observed rate" : "the assumed control rate";
  const looks: TwoArmLookAhead[] = [];
  table.response.forEach((b) => {
    if (b.n <= Math.max(nT, nC)) return;
    const aheadT = b.n - nT;
    const aheadC = b.n - nC;
    const eff: (number | null)[] = [];
    const fut: (number | null)[] = [];
    for (let yC = 0; yC <= aheadC; yC++) {
      eff.push(atLeastAmong(xT, aheadT, b.efficacyMinT[xC + yC]));
      fut.push(atMostAmong(xT, aheadT, b.futilityMaxT[xC + yC]));
    }
    const expectedControl = Math.min(aheadC, Math.max(0, Math.round(rateC * aheadC)));
    const row = { n: b.n, final: b.final, aheadT, aheadC, efficacyAtLeastT: eff, futilityAtMostT: fut, expectedControl };
    looks.push({ ...row, sentence: twoArmSentence(row, pendingT, pendingC, rateText) });
  });
  return {
    arms: "two",
    respondersT: xT,
    evaluableT: nT,
    pendingT,
    respondersC: xC,
    evaluableC: nC,
    pendingC,
    remainingT: N - nT,
    remainingC: N - nC,
    looks,
    final: looks.length && looks[looks.length - 1].final ? looks[looks.length - 1] : null,
  };
}
