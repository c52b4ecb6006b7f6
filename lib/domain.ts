// The trade's fixed vocabularies, each written once as a list; the types, zod enums and database
// checks derive from these lists. Pure constants: every layer (db/ included) may import this.

export const TRIAL_ROLES = ["unblinded_statistician", "dmc_member", "sponsor", "coordinator"] as const;
export type TrialRole = (typeof TRIAL_ROLES)[number];

/** A look's life: planned, opened for data entry, locked with a signature, reviewed by the DMC. */
export const ANALYSIS_STATUSES = ["planned", "open", "locked", "reviewed"] as const;
export type AnalysisStatus = (typeof ANALYSIS_STATUSES)[number];

/** What the committee may recommend at a look. */
export const RECOMMENDATION_DECISIONS = ["continue", "continue_modified", "stop_futility", "stop_efficacy", "stop_safety"] as const;
export type RecommendationDecision = (typeof RECOMMENDATION_DECISIONS)[number];

export const MEETING_STATUSES = ["scheduled", "held", "cancelled"] as const;
export type MeetingStatus = (typeof MEETING_STATUSES)[number];

/**
 * One arm's counts at one look (closed data): the record every layer passes around; the database
 * row (analysis_arm_counts) is its snake_case form, converted once by db/queries/closed.ts.
 * treated and toxicities are both numbers (a design with a safety rule) or both null; pending are
 * enrolled patients whose response is not yet known at the cut-off (absent means none).
 */
export type ArmCounts = {
  armId: number;
  enrolled: number;
  treated: number | null;
  evaluable: number;
  responders: number;
  toxicities: number | null;
  pending?: number | null;
};
