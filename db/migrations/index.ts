/**
 * The ordered list of migrations, imported statically so knex needs no runtime import() of .ts
 * files (which fails under vitest and in the Next bundle). Add a new migration file, then list it here.
 */
import type { Knex } from "knex";
import * as m1 from "./20261202000100_create_users";
import * as m2 from "./20261202000200_create_trials";
import * as m3 from "./20261202000300_create_arms";
import * as m4 from "./20261202000400_create_trial_memberships";
import * as m5 from "./20261202000500_create_signatures";
import * as m6 from "./20261202000600_create_designs";
import * as m7 from "./20261202000700_create_analyses";
import * as m8 from "./20261202000800_create_analysis_arm_counts";
import * as m9 from "./20261202000900_create_patient_outcomes";
import * as m10 from "./20261202001000_create_recommendations";
import * as m11 from "./20261202001100_create_audit_events";
import * as m12 from "./20261202001200_create_audit_chain_head";
import * as m13 from "./20261202001300_audit_events_refuse_update";
import * as m14 from "./20261202001400_audit_events_refuse_delete";
import * as m20 from "./20261202002000_create_meetings";
import * as m21 from "./20261202002100_create_meeting_attendees";
import * as m22 from "./20261202002200_create_packets";
import * as m23 from "./20261202002300_create_email_messages";
import * as m24 from "./20261202002400_create_calibration_jobs";
import * as m25 from "./20261202002500_create_sign_in_failures";
import * as m30301 from "./20261203030100_add_treated_to_analysis_arm_counts";
import * as m30302 from "./20261203030200_add_treated_to_patient_outcomes";
import * as mReviewVersionA from "./20261203040100_add_analyses_review_version";
import * as mReviewVersionR from "./20261203040200_add_recommendations_review_version";
import * as a1 from "./20261203050100_users_add_session_version";
import * as a2 from "./20261203050200_create_password_links";
import * as a3 from "./20261203050300_signatures_refuse_update";
import * as a4 from "./20261203050400_signatures_refuse_delete";
import * as a5 from "./20261203050500_recommendations_refuse_update";
import * as a6 from "./20261203050600_recommendations_refuse_delete";
import * as a7 from "./20261203050700_sign_in_failures_add_pair_scope";
import * as a8 from "./20261203050800_email_messages_trial_optional";
import * as a9 from "./20261203050900_email_messages_account_kinds";
import * as mBlind1 from "./20261203060100_audit_events_hash_scheme";
import * as mBlind2 from "./20261203060200_signatures_hash_scheme";
import * as mBlind3 from "./20261203060300_create_view_audit_events_open";
import * as mReviewCache from "./20261205030100_create_review_cache";
import * as mBlind4 from "./20261203060400_create_view_packets_open";
import * as mCommittee1 from "./20261205040100_create_committee_members";
import * as mCommittee2 from "./20261205040200_add_designs_dmc_quorum";
import * as mCommittee3 from "./20261205040300_create_meeting_session_attendance";
import * as mCommittee4 from "./20261205040400_create_conflict_declarations";
import * as mCommittee5 from "./20261205040500_create_committee_votes";
import * as mCommittee6 from "./20261205040600_recommendations_committee_columns";
import * as mCommittee7 from "./20261205040700_create_meeting_minutes";
import * as mCommittee8 from "./20261205040800_meeting_minutes_refuse_approved_update";
import * as mCommittee9 from "./20261205040900_meeting_minutes_refuse_approved_delete";
import * as mCommittee10 from "./20261205041000_create_view_meeting_minutes_open";
import * as mCommittee11 from "./20261205041100_create_recommendation_letters";
import * as mCommittee12 from "./20261205041200_email_messages_letter_kind";
import * as mCommittee13 from "./20261205041300_email_messages_letter_id";
import * as mWords1 from "./20261205050100_create_scheduler_leases";
import * as mPending1 from "./20261205060100_add_pending_to_analysis_arm_counts";
import * as mPending2 from "./20261205060200_add_outcome_pending_to_patient_outcomes";
import * as mApiTokens from "./20261205070000_create_api_tokens";
import * as mSignaturesOpen from "./20261205080000_create_view_signatures_open";

type Migration = { up: (k: Knex) => Promise<void>; down: (k: Knex) => Promise<void> };
const migrations: Array<[string, Migration]> = [
  ["20261202000100_create_users", m1],
  ["20261202000200_create_trials", m2],
  ["20261202000300_create_arms", m3],
  ["20261202000400_create_trial_memberships", m4],
  ["20261202000500_create_signatures", m5],
  ["20261202000600_create_designs", m6],
  ["20261202000700_create_analyses", m7],
  ["20261202000800_create_analysis_arm_counts", m8],
  ["20261202000900_create_patient_outcomes", m9],
  ["20261202001000_create_recommendations", m10],
  ["20261202001100_create_audit_events", m11],
  ["20261202001200_create_audit_chain_head", m12],
  ["20261202001300_audit_events_refuse_update", m13],
  ["20261202001400_audit_events_refuse_delete", m14],
  ["20261202002000_create_meetings", m20],
  ["20261202002100_create_meeting_attendees", m21],
  ["20261202002200_create_packets", m22],
  ["20261202002300_create_email_messages", m23],
  ["20261202002400_create_calibration_jobs", m24],
  ["20261202002500_create_sign_in_failures", m25],
  ["20261203030100_add_treated_to_analysis_arm_counts", m30301],
  ["20261203030200_add_treated_to_patient_outcomes", m30302],
  ["20261203040100_add_analyses_review_version", mReviewVersionA],
  ["20261203040200_add_recommendations_review_version", mReviewVersionR],
  ["20261203050100_users_add_session_version", a1],
  ["20261203050200_create_password_links", a2],
  ["20261203050300_signatures_refuse_update", a3],
  ["20261203050400_signatures_refuse_delete", a4],
  ["20261203050500_recommendations_refuse_update", a5],
  ["20261203050600_recommendations_refuse_delete", a6],
  ["20261203050700_sign_in_failures_add_pair_scope", a7],
  ["20261203050800_email_messages_trial_optional", a8],
  ["20261203050900_email_messages_account_kinds", a9],
  ["20261203060100_audit_events_hash_scheme", mBlind1],
  ["20261203060200_signatures_hash_scheme", mBlind2],
  ["20261203060300_create_view_audit_events_open", mBlind3],
  ["20261203060400_create_view_packets_open", mBlind4],
  ["20261205030100_create_review_cache", mReviewCache],
  ["20261205040100_create_committee_members", mCommittee1],
  ["20261205040200_add_designs_dmc_quorum", mCommittee2],
  ["20261205040300_create_meeting_session_attendance", mCommittee3],
  ["20261205040400_create_conflict_declarations", mCommittee4],
  ["20261205040500_create_committee_votes", mCommittee5],
  ["20261205040600_recommendations_committee_columns", mCommittee6],
  ["20261205040700_create_meeting_minutes", mCommittee7],
  ["20261205040800_meeting_minutes_refuse_approved_update", mCommittee8],
  ["20261205040900_meeting_minutes_refuse_approved_delete", mCommittee9],
  ["20261205041000_create_view_meeting_minutes_open", mCommittee10],
  ["20261205041100_create_recommendation_letters", mCommittee11],
  ["20261205041200_email_messages_letter_kind", mCommittee12],
  ["20261205041300_email_messages_letter_id", mCommittee13],
  ["20261205050100_create_scheduler_leases", mWords1],
  ["20261205060100_add_pending_to_analysis_arm_counts", mPending1],
  ["20261205060200_add_outcome_pending_to_patient_outcomes", mPending2],
  ["20261205070000_create_api_tokens", mApiTokens],
  ["20261205080000_create_view_signatures_open", mSignaturesOpen],
];

export const migrationSource: Knex.MigrationSource<[string, Migration]> = {
  getMigrations: async () => migrations,
  getMigrationName: ([name]) => name,
  getMigration: async ([, m]) => m,
};

export const migrationNames = migrations.map(([name]) => name);
