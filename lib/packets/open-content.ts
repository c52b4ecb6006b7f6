/**
 * The open part of a meeting packet: what every member of the trial may read (accrual, the look
 * schedule, data timeliness, recommendations without rationale, the open-session agenda, the
 * caution). Pure: its input type has no field that could carry arm-level data.
 */
import { differenceInCalendarDays, format } from "date-fns";
import { ANALYSIS_STATUS_LABELS, DECISION_LABELS } from "@/lib/format";
import type { AnalysisStatus, RecommendationDecision } from "@/db/types";
import { formatMeetingTime } from "./meeting-time";
import type { PacketSection } from "./document";

export type OpenPacketInput = {
  trial: {
    code: string;
    title: string;
    sponsorName: string;
    phase: string;
    designType: "single" | "two";
    endpointName: string;
    targetEnrolment: number;
    firstPatientOn: string | null;
  };
  meeting: {
    scheduledAt: Date;
    timeZone: string;
    openAgenda: string;
    lookNumber: number;
    attendees: Array<{ name: string; roles: string[] }>;
  };
  looks: Array<{ lookNumber: number; plannedN: number; cutoffDate: string | null; enrolledTotal: number | null; status: AnalysisStatus; lockedAt: Date | null }>;
  recommendations: Array<{ lookNumber: number; decision: RecommendationDecision; recordedAt: Date; signerName: string; correctsId: number | null; superseded?: boolean }>;
  caution: string;
};

const day = (d: Date | string) => format(typeof d === "string" ? new Date(`${d}T00:00:00Z`) : d, "d MMM yyyy");

export function meetingLabel(input: Pick<OpenPacketInput, "meeting">): string {
  return `DMC meeting, ${formatMeetingTime(input.meeting.scheduledAt, input.meeting.timeZone)}, reviewing look ${input.meeting.lookNumber}`;
}

export function buildOpenSections(input: OpenPacketInput): PacketSection[] {
  const { trial, meeting, looks } = input;
  const reviewed = looks.find((l) => l.lookNumber === meeting.lookNumber);
  const latestEnrolled = [...looks].reverse().find((l) => l.enrolledTotal !== null);
  const perArm = trial.designType === "two" ? " per arm" : "";

  const about: PacketSection = {
    id: "open-about",
    part: "open",
    title: "Open report: about this packet",
    blocks: [
      {
        kind: "paragraph",
        text: "This is the open part of the meeting packet. It holds no arm-level or outcome data and goes to everyone on the trial: the sponsor, the trial coordinator, the DMC members and the unblinded statistician.",
      },
      {
        kind: "facts",
        rows: [
          ["Trial", `${trial.code}: ${trial.title}`],
          ["Sponsor", trial.sponsorName],
          ["Phase and design", `phase ${trial.phase}, ${trial.designType === "two" ? "randomised, two arms" : "single arm"}`],
          ["Primary endpoint (binary)", trial.endpointName],
          ["Meeting", formatMeetingTime(meeting.scheduledAt, meeting.timeZone)],
          ["Look reviewed", reviewed ? `look ${reviewed.lookNumber} (planned at ${reviewed.plannedN} patients${perArm})` : `look ${meeting.lookNumber}`],
          ["Invited", meeting.attendees.length ? meeting.attendees.map((a) => `${a.name} (${a.roles.join(", ") || "no role"})`).join("; ") : "nobody yet"],
        ],
      },
      { kind: "paragraph", tone: "caution", text: `Caution. ${input.caution}` },
    ],
  };

  const agenda: PacketSection = {
    id: "open-agenda",
    part: "open",
    title: "Open session agenda",
    blocks: [{ kind: "paragraph", text: meeting.openAgenda.trim() || "No open-session agenda was entered." }],
  };

  const enrolled = latestEnrolled?.enrolledTotal ?? 0;
  const accrual: PacketSection = {
    id: "open-accrual",
    part: "open",
    title: "Accrual",
    blocks: [
      {
        kind: "facts",
        rows: [
          ["Enrolled (pooled across arms)", `${enrolled} of ${trial.targetEnrolment} planned (${trial.targetEnrolment > 0 ? ((100 * enrolled) / trial.targetEnrolment).toFixed(1) : "0.0"}%)`],
          ["As of data cut-off", latestEnrolled?.cutoffDate ? day(latestEnrolled.cutoffDate) : "no data cut-off yet"],
          ["First patient enrolled", trial.firstPatientOn ? day(trial.firstPatientOn) : "not yet"],
        ],
      },
      {
        kind: "table",
        caption: "Enrolment at each data cut-off (pooled)",
        columns: ["Look", "Data cut-off", "Enrolled (pooled)"],
        rows: looks.filter((l) => l.enrolledTotal !== null).map((l) => [String(l.lookNumber), l.cutoffDate ? day(l.cutoffDate) : "-", String(l.enrolledTotal)]),
      },
    ],
  };

  const schedule: PacketSection = {
    id: "open-looks",
    part: "open",
    title: "Look schedule",
    blocks: [
      {
        kind: "table",
        caption: `Planned interim analyses (sizes${perArm})`,
        columns: ["Look", `Planned size${perArm}`, "Status", "Data cut-off", "Locked"],
        rows: looks.map((l) => [String(l.lookNumber), String(l.plannedN), ANALYSIS_STATUS_LABELS[l.status], l.cutoffDate ? day(l.cutoffDate) : "-", l.lockedAt ? day(l.lockedAt) : "-"]),
      },
    ],
  };

  const timeliness: PacketSection = {
    id: "open-timeliness",
    part: "open",
    title: "Data timeliness",
    blocks: [
      {
        kind: "table",
        caption: "Days from data cut-off to analysis lock and to this meeting",
        columns: ["Look", "Data cut-off", "Days to lock", "Days to this meeting"],
        rows: looks
          .filter((l) => l.cutoffDate)
          .map((l) => {
            const cut = new Date(`${l.cutoffDate}T00:00:00Z`);
            return [
              String(l.lookNumber),
              day(l.cutoffDate as string),
              l.lockedAt ? String(differenceInCalendarDays(l.lockedAt, cut)) : "not locked",
              l.lookNumber === meeting.lookNumber ? String(differenceInCalendarDays(meeting.scheduledAt, cut)) : "-",
            ];
          }),
      },
    ],
  };

  const recs: PacketSection = {
    id: "open-recommendations",
    part: "open",
    title: "Recommendations recorded so far",
    blocks: input.recommendations.length
      ? [
          {
            kind: "table",
            caption: "The committee's recommendations (decision only; the reasons given are part of the closed record)",
            columns: ["Look", "Recommendation", "Recorded", "Signed by"],
            rows: input.recommendations.map((r) => [String(r.lookNumber), `${DECISION_LABELS[r.decision]}${r.correctsId ? " (correction)" : ""}${r.superseded ? " (superseded: the look was reopened for a correction)" : ""}`, day(r.recordedAt), r.signerName]),
          },
        ]
      : [{ kind: "paragraph", text: "No recommendation has been recorded yet." }],
  };

  return [about, agenda, accrual, schedule, timeliness, recs];
}
