/**
 * The ids of the matrix fixture and of the two demo trials' records, made once per run by
 * support/global-setup.ts and handed to every worker in the environment. Read it inside a test or a
 * hook, never at a spec's top level: Playwright lists the tests before the global set-up runs.
 */
export type TrialIds = { trial: number; analysis: number; arm: number; design: number; meeting?: number; packetOpen?: number; packetClosed?: number };
export type TrialKey = "single" | "two" | "fixture";
export type MatrixIds = Record<TrialKey, TrialIds> & { code: string };

export const MATRIX_IDS_ENV = "CAIRN_E2E_MATRIX_IDS";

export function matrixIds(): MatrixIds {
  const raw = process.env[MATRIX_IDS_ENV];
  if (!raw) throw new Error(`${MATRIX_IDS_ENV} is not set: the browser tests' global set-up (tests/e2e/support/global-setup.ts) did not run`);
  return JSON.parse(raw) as MatrixIds;
}

/** A matrix path template ("/trials/{trial}/review/{analysis}") with a trial's ids put in; undefined when one is missing. */
export function fillPath(template: string, t: TrialIds | undefined): string | undefined {
  let unresolved = false;
  const out = template.replace(/\{(\w+)\}/g, (_, k: string) => {
    const v = t?.[k as keyof TrialIds];
    if (v === undefined) unresolved = true;
    return String(v);
  });
  return unresolved ? undefined : out;
}
