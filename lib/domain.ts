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
