/**
 * The audit trail in words: readable action and record names, who acted, and what changed as text
 * ("Status: planned → locked"). The stored rows keep their machine names (the hash chain covers
 * them); this is only how screens show them. Pure, no imports: the grid (a client component) uses it.
 */

const ACTIONS: Record<string, string> = {
  account_created: "Account created",
  account_deactivated: "Account deactivated",
  account_reactivated: "Account reactivated",
  analysis_locked: "Look locked",
  analysis_opened: "Look opened for data",
  analysis_reopened_for_amendment: "Look moved to the amended design",
  correction_reason_recorded: "Reason for correction recorded",
  counts_entered: "Counts entered",
  design_amendment_started: "Design amendment started",
  design_draft_created: "Design draft created",
  design_draft_updated: "Design draft changed",
  design_locked: "Design locked",
  email_attempt_failed: "E-mail attempt failed",
  email_failed: "E-mail failed",
  email_requeued: "E-mail queued again",
  email_sent: "E-mail sent",
  meeting_attendance_recorded: "Attendance recorded",
  meeting_cancelled: "Meeting cancelled",
  meeting_closed_agenda_set: "Closed agenda written",
  meeting_reminder_queued: "Meeting reminder queued",
  meeting_scheduled: "Meeting scheduled",
  packet_generated: "Meeting packet generated",
  packet_mail_queued: "Meeting packet e-mails queued",
  password_change_failed: "Password change refused",
  password_changed: "Password changed",
  password_link_issued: "Set-password link issued",
  password_set_by_link: "Password set through a link",
  patient_data_uploaded: "Patient data uploaded",
  recommendation_corrected: "Recommendation corrected",
  recommendation_recorded: "Recommendation recorded",
  review_reopened_for_correction: "Review reopened for correction",
  role_assigned: "Role given",
  role_removed: "Role removed",
  sign_in: "Signed in",
  sign_in_failed: "Sign-in refused",
  sign_out: "Signed out",
  signature_password_failed: "Signature password refused",
  switched_to_count_level: "Switched to count entry",
  trial_created: "Trial created",
};

const RECORDS: Record<string, string> = {
  analysis: "Look",
  design: "Design",
  email_message: "E-mail",
  meeting: "Meeting",
  packet: "Packet",
  recommendation: "Recommendation",
  signature: "Signature",
  trial: "Trial",
  trial_membership: "Role on trial",
  user: "Account",
};

/** Machine actors of the system itself, and the demo seed. */
const ACTORS: Record<string, string> = {
  "demo-seed": "demo data",
  "cairn-mail": "Cairn (mail delivery)",
  "cairn-reminders": "Cairn (mail scheduler)",
};

/** "some_thing_done" → "Some thing done": the fallback for a name not listed yet. */
function sentence(snake: string): string {
  const s = snake.replace(/[_-]+/g, " ").trim();
  return s ? s[0].toUpperCase() + s.slice(1) : snake;
}

export function actionWords(action: string): string {
  return ACTIONS[action] ?? sentence(action);
}

export function recordWords(entityType: string): string {
  return RECORDS[entityType] ?? sentence(entityType);
}

export function actorWords(actorEmail: string | null): string {
  if (!actorEmail) return "Cairn";
  return ACTORS[actorEmail] ?? actorEmail;
}

/** "signatureId" → "signature id", "review_version" → "review version". */
export function keyWords(key: string): string {
  const s = key.replace(/_/g, " ").replace(/([a-z0-9])([A-Z])/g, "$1 $2").toLowerCase().trim();
  return s ? s[0].toUpperCase() + s.slice(1) : key;
}

/** A value as short text: null "none", booleans yes/no, lists joined, records as "key: value". */
export function valueWords(v: unknown): string {
  if (v === null || v === undefined) return "none";
  if (typeof v === "boolean") return v ? "yes" : "no";
  if (typeof v === "string") return v === "" ? "(empty)" : v;
  if (typeof v === "number") return String(v);
  if (Array.isArray(v)) return v.length === 0 ? "none" : v.map(valueWords).join(", ");
  if (typeof v === "object") {
    const parts = Object.entries(v as Record<string, unknown>).map(([k, x]) => `${keyWords(k).toLowerCase()} ${valueWords(x)}`);
    return parts.length ? `(${parts.join(", ")})` : "none";
  }
  return String(v);
}

const isRecord = (v: unknown): v is Record<string, unknown> => typeof v === "object" && v !== null && !Array.isArray(v);

/**
 * What changed, one line per field: "Status: planned → locked" where both sides name it, "Role:
 * sponsor" for a new value only, "Role: sponsor (removed)" for an old value only.
 */
export function changeWords(oldValues: unknown, newValues: unknown): string[] {
  const o = isRecord(oldValues) ? oldValues : oldValues === null || oldValues === undefined ? {} : { value: oldValues };
  const n = isRecord(newValues) ? newValues : newValues === null || newValues === undefined ? {} : { value: newValues };
  const keys = [...new Set([...Object.keys(o), ...Object.keys(n)])];
  return keys.map((k) => {
    const label = keyWords(k);
    if (k in o && k in n) return `${label}: ${valueWords(o[k])} → ${valueWords(n[k])}`;
    if (k in n) return `${label}: ${valueWords(n[k])}`;
    return `${label}: ${valueWords(o[k])} (before)`;
  });
}
