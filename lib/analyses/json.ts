import type { AnalysisOpenRow } from "@/db/types";
import type { PatientOutcomeGridRow } from "@/db/queries/closed";

/** The open fields of a look as JSON (camelCase, UTC ISO times). */
export function lookJson(a: AnalysisOpenRow) {
  return {
    id: a.id,
    lookNumber: a.look_number,
    plannedN: a.planned_n,
    cutoffDate: a.cutoff_date,
    enrolledTotal: a.enrolled_total,
    status: a.status,
    amendmentCount: a.amendment_count,
    rowVersion: a.row_version,
    lockedAt: a.locked_at ? new Date(a.locked_at).toISOString() : null,
    reviewedAt: a.reviewed_at ? new Date(a.reviewed_at).toISOString() : null,
  };
}

const flag = (v: number | boolean | null) => (v === null ? null : Boolean(v));

export function patientJson(p: PatientOutcomeGridRow) {
  return {
    line: p.source_line,
    subjectId: p.subject_id,
    armId: p.arm_id,
    arm: p.arm_label,
    enrolmentDate: p.enrolled_on,
    evaluable: Boolean(p.evaluable),
    /** Will be evaluable, response not yet known at the cut-off. */
    pending: Boolean(p.outcome_pending),
    responder: flag(p.responder),
    treated: flag(p.treated),
    toxicity: flag(p.toxicity),
  };
}
export type PatientJson = ReturnType<typeof patientJson>;
