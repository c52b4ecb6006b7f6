/** Display rounding (product brief): probabilities to 3 decimals, rates as percentages with 1 decimal. */
export function formatProbability(p: number | null | undefined): string {
  if (p === null || p === undefined || !Number.isFinite(p)) return "—";
  return p.toFixed(3);
}

export function formatRate(p: number | null | undefined): string {
  if (p === null || p === undefined || !Number.isFinite(p)) return "—";
  return `${(p * 100).toFixed(1)}%`;
}

/** A stopping boundary where no count stops shows as "none". */
export function formatBoundary(count: number | null | undefined): string {
  return count === null || count === undefined ? "none" : String(count);
}

export const DECISION_LABELS = {
  continue: "Continue as planned",
  continue_modified: "Continue with modification",
  stop_futility: "Stop for futility",
  stop_efficacy: "Stop for efficacy",
  stop_safety: "Stop for safety",
} as const;

export const ANALYSIS_STATUS_LABELS = {
  planned: "Planned",
  open: "Open for entry",
  locked: "Locked",
  reviewed: "Reviewed",
} as const;
