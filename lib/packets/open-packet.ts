import "server-only";
/**
 * The open packet of a meeting: built from open queries alone, so a blinded organiser (the
 * coordinator) can make it. This module must not import the closed packet or db/queries/closed.ts
 * (lib/review/blinding-static.test.ts checks the meetings page and its actions).
 */
import type { PublicUser, TrialRow } from "@/db/types";
import { fetchAttendees, fetchMeeting } from "@/db/queries/meetings";
import { fetchLookSchedule, fetchRecommendationsOpen } from "@/db/queries/open-status";
import { CAUTION_TEXT } from "@/lib/caution";
import { ROLE_LABELS } from "@/lib/auth/permissions";
import { HttpError } from "@/lib/http";
import { buildOpenPacket } from "./build-open";
import type { OpenPacketInput } from "./open-content";
import { storePacketIfChanged, type GeneratedPacket } from "./store";

export type MeetingPacketInput = OpenPacketInput & { analysisId: number; meetingId: number };

/** Everything the open part needs, read with open queries only. */
export async function loadOpenPacketInput(trial: TrialRow, meetingId: number): Promise<MeetingPacketInput> {
  const meeting = await fetchMeeting(trial.id, meetingId);
  if (!meeting) throw new HttpError(404, "That meeting was not found.");
  const [looks, recommendations, attendees] = await Promise.all([fetchLookSchedule(trial.id), fetchRecommendationsOpen(trial.id), fetchAttendees(meetingId)]);
  return {
    analysisId: meeting.analysis_id,
    meetingId: meeting.id,
    trial: {
      code: trial.code,
      title: trial.title,
      sponsorName: trial.sponsor_name,
      phase: trial.phase,
      designType: trial.design_type,
      endpointName: trial.endpoint_name,
      targetEnrolment: trial.target_enrolment,
      firstPatientOn: trial.first_patient_on,
    },
    meeting: {
      scheduledAt: new Date(meeting.scheduled_at),
      timeZone: meeting.time_zone,
      openAgenda: meeting.open_agenda,
      lookNumber: meeting.lookNumber,
      attendees: attendees.map((a) => ({ name: a.name, roles: a.roles.map((r) => ROLE_LABELS[r]) })),
    },
    looks: looks.map((l) => ({ lookNumber: l.look_number, plannedN: l.planned_n, cutoffDate: l.cutoff_date, enrolledTotal: l.enrolled_total, status: l.status, lockedAt: l.locked_at ? new Date(l.locked_at) : null })),
    recommendations: recommendations.map((r) => ({ lookNumber: r.lookNumber, decision: r.decision, recordedAt: new Date(r.recordedAt), signerName: r.signerName, correctsId: r.correctsId, superseded: r.superseded })),
    caution: CAUTION_TEXT,
  };
}

/** Generates (or confirms unchanged) the open packet of a meeting. */
export async function generateOpenPacket(trial: TrialRow, meetingId: number, user: PublicUser, now = new Date()): Promise<GeneratedPacket> {
  const open = await loadOpenPacketInput(trial, meetingId);
  return storePacketIfChanged(trial, meetingId, buildOpenPacket(open), user, now);
}
