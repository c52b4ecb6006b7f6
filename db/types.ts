/** Row types, declared once for the whole app. Arm-level (closed) rows are marked as such. */
import type { AnalysisStatus, MeetingStatus, RecommendationDecision, TrialRole } from "@/lib/domain";
export { TRIAL_ROLES } from "@/lib/domain";
export type { AnalysisStatus, MeetingStatus, RecommendationDecision, TrialRole };

export type UserRow = {
  id: number;
  email: string;
  name: string;
  password_hash: string;
  is_admin: number | boolean;
  is_active: number | boolean;
  /** Bumped by sign-out, a password change and deactivation; a session carrying an older one is refused. */
  session_version: number;
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
  /** The DMC's quorum written in this (charter) version; null when none was written. */
  dmc_quorum?: number | null;
};

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
  /** The review version in force: 1, then +1 each time the look is reopened after review. */
  review_version: number;
};

/** CLOSED: arm-level counts. Only ever selected through db/queries/closed.ts. */
export type ArmCountRow = {
  id: number;
  analysis_id: number;
  arm_id: number;
  enrolled: number;
  /** Patients evaluable for toxicity (treated): the safety rule's denominator; null when toxicities are not recorded. */
  treated: number | null;
  /** Patients evaluable for response: the response rule's denominator. */
  evaluable: number;
  /** Enrolled, will be evaluable, response not yet known at the cut-off (0 for rows stored before the column). */
  pending: number;
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
  /** Will be evaluable, response not yet known at the cut-off (CSV evaluable value "pending"); false when absent. */
  outcome_pending?: number | boolean;
  responder: number | boolean | null;
  /** Evaluable for toxicity; null when the design records no toxicity. */
  treated: number | boolean | null;
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
  /** How record_hash was made: "sha256" (before keyed hashing) or "hmac-sha256". */
  hash_scheme?: "sha256" | "hmac-sha256";
};


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
  /** "sha256" for rows written before keyed hashing, "hmac-sha256" since (db/keyed-hash.ts). */
  hash_scheme: "sha256" | "hmac-sha256";
};

/** An audit row without its hashes: what a blinded viewer's query selects (see fetchAuditEvents). */
export type AuditEventOpenRow = Omit<AuditEventRow, "hash" | "prev_hash" | "hash_scheme">;

/** A DMC meeting. Open information: time, open agenda, the look it reviews. The closed agenda is closed (db/queries/closed.ts fetchClosedAgenda). */
export type MeetingRow = {
  id: number;
  trial_id: number;
  analysis_id: number;
  /** UTC instant. */
  scheduled_at: Date;
  /** IANA time zone the meeting was scheduled in, e.g. "Europe/Oslo". */
  time_zone: string;
  open_agenda: string;
  reminder_days_before: number;
  reminder_sent_at: Date | null;
  status: MeetingStatus;
  row_version: number;
  created_by: number | null;
  created_at: Date;
  updated_at: Date;
};

export type PacketAudience = "open" | "closed";
/** A generated packet without its PDF bytes (listings never select them). */
export type PacketMetaRow = {
  id: number;
  meeting_id: number;
  version: number;
  audience: PacketAudience;
  content_hash: string;
  engine_version: string;
  page_count: number;
  byte_size: number;
  created_at: Date;
  created_by: number | null;
};
/** CLOSED when audience is "closed": the PDF holds arm-level results. */
export type PacketRow = PacketMetaRow & { pdf: Buffer };

export type EmailKind = "packet_open" | "packet_closed_notice" | "meeting_reminder" | "password_link" | "password_changed" | "recommendation_letter";
type EmailStatus = "queued" | "sending" | "sent" | "failed";
export type EmailMessageRow = {
  id: number;
  /** null for account mails (set-password link, password-changed notice). */
  trial_id: number | null;
  meeting_id: number | null;
  packet_id: number | null;
  /** The recommendation letter a "recommendation_letter" mail carries (null otherwise). */
  letter_id?: number | null;
  to_user_id: number | null;
  to_address: string;
  subject: string;
  kind: EmailKind;
  body_text: string;
  status: EmailStatus;
  attempts: number;
  last_error: string | null;
  next_attempt_at: Date | null;
  sent_at: Date | null;
  smtp_message_id: string | null;
  created_by: number | null;
  created_at: Date;
};

/** A one-time set-password link; only the SHA-256 of its token is stored. */
export type PasswordLinkRow = {
  id: number;
  user_id: number;
  token_sha256: string;
  expires_at: Date;
  used_at: Date | null;
  revoked_at: Date | null;
  issued_by: number | null;
  created_at: Date;
};

/** A personal API token (lib/auth/api-tokens.ts): one account, one trial, the role held there. */
export type ApiTokenRow = {
  id: number;
  user_id: number;
  trial_id: number;
  role: TrialRole;
  label: string;
  token_sha256: string;
  expires_at: Date;
  revoked_at: Date | null;
  created_at: Date;
};

/** A trial's DMC as its charter sets it up: the chair (who votes), voting members, the independent (non-voting) statistician. */
export type CommitteeRole = "chair" | "voting" | "statistician";
export type MinutesSession = "open" | "closed";
