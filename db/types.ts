/** Row types, declared once for the whole app. Arm-level (closed) rows are marked as such. */
export type TrialRole = "unblinded_statistician" | "dmc_member" | "sponsor" | "coordinator";
export const TRIAL_ROLES: readonly TrialRole[] = ["unblinded_statistician", "dmc_member", "sponsor", "coordinator"];

export type UserRow = {
  id: number;
  email: string;
  name: string;
  password_hash: string;
  is_admin: number | boolean;
  is_active: number | boolean;
  created_at: Date;
  updated_at: Date;
};
export type PublicUser = { id: number; email: string; name: string; isAdmin: boolean; isActive: boolean };

export type TrialRow = {
  id: number;
  code: string;
  title: string;
  sponsor_name: string;
  phase: string;
  design_type: "single" | "two";
  endpoint_name: string;
  toxicity_endpoint_name: string | null;
  target_enrolment: number;
  first_patient_on: string | null;
  status: "design" | "active" | "closed";
  created_by: number | null;
  created_at: Date;
  updated_at: Date;
};

export type ArmRow = { id: number; trial_id: number; label: string; arm_role: "single" | "experimental" | "control"; sort_order: number };

export type MembershipRow = { id: number; trial_id: number; user_id: number; role: TrialRole; created_at: Date };

export type DesignRow = {
  id: number;
  trial_id: number;
  version: number;
  status: "draft" | "locked" | "superseded";
  spec: string;
  amendment_reason: string | null;
  row_version: number;
  signature_id: number | null;
  created_by: number | null;
  created_at: Date;
  locked_at: Date | null;
};

export type AnalysisStatus = "planned" | "open" | "locked" | "reviewed";
/** Open information about a look: safe for every role on the trial. */
export type AnalysisOpenRow = {
  id: number;
  trial_id: number;
  design_id: number;
  look_number: number;
  planned_n: number;
  cutoff_date: string | null;
  enrolled_total: number | null;
  status: AnalysisStatus;
  amendment_count: number;
  row_version: number;
  locked_at: Date | null;
  reviewed_at: Date | null;
};

/** CLOSED: arm-level counts. Only ever selected through db/queries/closed.ts. */
export type ArmCountRow = {
  id: number;
  analysis_id: number;
  arm_id: number;
  enrolled: number;
  evaluable: number;
  responders: number;
  toxicities: number | null;
};

/** CLOSED: one patient's outcome at a look. */
export type PatientOutcomeRow = {
  id: number;
  analysis_id: number;
  subject_id: string;
  arm_id: number;
  enrolled_on: string;
  evaluable: number | boolean;
  responder: number | boolean | null;
  toxicity: number | boolean | null;
  source_line: number;
};

export type SignatureRow = {
  id: number;
  user_id: number;
  signer_name: string;
  signer_email: string;
  meaning: string;
  entity_type: string;
  entity_id: number;
  record_hash: string;
  signed_at: Date;
};

export type RecommendationDecision = "continue" | "continue_modified" | "stop_futility" | "stop_efficacy" | "stop_safety";

export type AuditVisibility = "open" | "closed";
export type AuditEventRow = {
  id: number;
  occurred_at: Date;
  actor_user_id: number | null;
  actor_email: string | null;
  trial_id: number | null;
  action: string;
  entity_type: string;
  entity_id: string | null;
  visibility: AuditVisibility;
  old_values: string | null;
  new_values: string | null;
  reason: string | null;
  prev_hash: string;
  hash: string;
};
