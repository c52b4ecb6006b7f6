/**
 * Which data a blinded role may read, declared once, at the schema. Two uses:
 *  - FREE_TEXT: every text-like column of every table (varchar, text, json, blob) is open, closed
 *    or secret. Closed text goes only into closed rows (audit rows with visibility "closed"); a
 *    form that writes it says so beside the field. The migrations test checks the list against
 *    information_schema, so a new text column fails until it is classified here.
 *  - BLINDED_READS: what the blinded database account (cairn_blind) may SELECT, table by table;
 *    scripts/lib/common.sh turns it into grants (scripts/blind-grants.ts) after every migration.
 *    A table not listed gets no grant: deny by default. The blinding-database test tries every
 *    column of every table as that account and expects exactly these to be readable.
 * Plain data (no server-only, no I/O) so the grant script and the tests can import it.
 */

/** open: blinded roles read it; closed: only unblinded roles (arm-level data, outcomes, closed-session text); secret: nobody reads it back (credentials, keys, hashes that chain over closed rows). */
type TextClass = "open" | "closed" | "secret";

export const FREE_TEXT: Record<string, TextClass> = {
  "arms.label": "open",
  "audit_chain_head.last_hash": "secret",
  "audit_events.actor_email": "open",
  "audit_events.action": "open",
  "audit_events.entity_type": "open",
  "audit_events.entity_id": "open",
  // Row-level: open in open rows, closed in closed rows (the view audit_events_open keeps the open ones).
  "audit_events.old_values": "open",
  "audit_events.new_values": "open",
  "audit_events.reason": "open",
  // A row's hash chains over the row before it, which may be closed.
  "audit_events.prev_hash": "secret",
  "audit_events.hash": "secret",
  "audit_events.hash_scheme": "secret",
  "calibration_jobs.id": "open",
  "committee_members.member_role": "open",
  // A member's declared conflict of interest is recorded in the open minutes (the form says so).
  "conflict_declarations.statement": "open",
  "committee_votes.decision": "closed",
  "committee_votes.comment": "closed",
  "calibration_jobs.best_json": "open",
  "calibration_jobs.error": "open",
  "designs.spec": "open",
  "designs.amendment_reason": "open",
  "email_messages.to_address": "open",
  "email_messages.subject": "open",
  // Mail templates take no closed data (lib/mail/templates.ts): DMC members get a link, not content.
  "email_messages.body_text": "open",
  "email_messages.last_error": "open",
  "email_messages.smtp_message_id": "open",
  "knex_migrations.name": "open",
  "knex_migrations_checksums.name": "open",
  "knex_migrations_checksums.sha256": "open",
  "meeting_minutes.session": "open",
  // Row-level: open in open-session rows, closed in closed-session rows (the view meeting_minutes_open keeps the open ones).
  "meeting_minutes.body": "open",
  "meeting_session_attendance.session": "open",
  "meetings.time_zone": "open",
  "meetings.open_agenda": "open",
  "meetings.closed_agenda": "closed",
  // Row-level: the closed packet's hash is derived from closed data (view packets_open keeps open rows).
  "packets.content_hash": "closed",
  "packets.engine_version": "open",
  "packets.pdf": "open",
  // Only the SHA-256 of a 256-bit random token: nobody reads it back but the set-password check.
  "password_links.token_sha256": "secret",
  // Only the SHA-256 of a 256-bit random API token secret: nobody reads it back but the bearer check.
  "api_tokens.token_sha256": "secret",
  // The owner's name for a token; shown to the owner and in open audit rows (the form says so).
  "api_tokens.label": "open",
  "patient_outcomes.subject_id": "closed",
  "recommendations.rationale": "closed",
  // The kept closed review of a locked look (arm-level results) and the hash of its closed inputs.
  "review_cache.engine_version": "closed",
  "review_cache.input_sha256": "closed",
  "review_cache.review_json": "closed",
  // Counted from the closed votes, and the dissent is the committee's closed reasoning.
  "recommendations.tally_json": "closed",
  "recommendations.dissent": "closed",
  // The letter carries no data and no votes (lib/committee/letter-content.ts).
  "recommendation_letters.content_hash": "open",
  "recommendation_letters.pdf": "open",
  // The reason a locked look was reopened may describe the data that needed correcting.
  "analyses.reopen_reason": "closed",
  "signatures.signer_name": "open",
  "signatures.signer_email": "open",
  "signatures.meaning": "open",
  "signatures.entity_type": "open",
  // The hash of a signed lock record covers that look's counts.
  "signatures.record_hash": "closed",
  "signatures.hash_scheme": "open",
  "scheduler_leases.name": "open",
  "scheduler_leases.holder": "open",
  "sign_in_failures.subject": "secret",
  "trials.code": "open",
  "trials.title": "open",
  "trials.sponsor_name": "open",
  "trials.phase": "open",
  "trials.endpoint_name": "open",
  "trials.toxicity_endpoint_name": "open",
  "users.email": "open",
  "users.name": "open",
  "users.password_hash": "secret",
};

/**
 * What the blinded account may SELECT. "all": the whole table; a column list: only those columns
 * (a column-level grant, so SELECT * and any other column are refused); "none": nothing. Views
 * hold the row-level splits (closed audit rows, closed packets). Every base table and view must
 * appear here.
 */
export const BLINDED_READS: Record<string, "all" | "none" | readonly string[]> = {
  analyses: ["id", "trial_id", "design_id", "look_number", "planned_n", "cutoff_date", "enrolled_total", "status", "amendment_count", "review_version", "row_version", "lock_signature_id", "locked_at", "reviewed_at", "created_at", "updated_at"],
  analysis_arm_counts: "none",
  arms: "all",
  audit_chain_head: "none",
  audit_events: "none",
  audit_events_open: "all",
  calibration_jobs: "all",
  committee_members: "all",
  committee_votes: "none",
  conflict_declarations: "all",
  designs: "all",
  email_messages: "all",
  knex_migrations: "none",
  knex_migrations_lock: "none",
  knex_migrations_checksums: "none",
  meeting_attendees: "all",
  meeting_minutes: "none",
  meeting_minutes_open: "all",
  meeting_session_attendance: "all",
  meetings: ["id", "trial_id", "analysis_id", "scheduled_at", "time_zone", "open_agenda", "reminder_days_before", "reminder_sent_at", "status", "row_version", "created_by", "created_at", "updated_at"],
  packets: "none",
  password_links: "none",
  api_tokens: "none",
  packets_open: "all",
  patient_outcomes: "none",
  review_cache: "none",
  recommendation_letters: "all",
  recommendations: ["id", "trial_id", "analysis_id", "review_version", "decision", "corrects_id", "signature_id", "created_by", "created_at"],
  // Row-level: a vote's signature row is closed (it counts the votes); view signatures_open leaves those rows out.
  signatures: "none",
  signatures_open: "all",
  scheduler_leases: "none",
  sign_in_failures: "none",
  trial_memberships: "all",
  trials: "all",
  users: ["id", "email", "name", "is_admin", "is_active", "created_at", "updated_at"],
};

/** The GRANT statements for the blinded account on database `db` (deny by default: unlisted tables get none). */
export function blindedGrantStatements(db: string, account: string, existing: string[]): string[] {
  const q = (s: string) => `\`${s.replace(/`/g, "``")}\``;
  const out: string[] = [];
  for (const t of existing) {
    const r = BLINDED_READS[t];
    if (r === undefined || r === "none") continue;
    if (r === "all") out.push(`GRANT SELECT ON ${q(db)}.${q(t)} TO ${account};`);
    else out.push(`GRANT SELECT (${r.map(q).join(", ")}) ON ${q(db)}.${q(t)} TO ${account};`);
  }
  return out;
}
