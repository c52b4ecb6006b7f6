import type { Metadata } from "next";
import Link from "next/link";
import { authorizePage, allows } from "@/lib/auth";
import { parseId } from "@/lib/route-params";
import { fetchMeetings } from "@/db/queries/meetings";
import { fetchLookSchedule, fetchRecommendationsOpen } from "@/db/queries/open-status";
import { fetchMemberships } from "@/db/queries/memberships";
import { ROLE_LABELS } from "@/lib/auth/permissions";
import { ANALYSIS_STATUS_LABELS, DECISION_LABELS } from "@/lib/format";
import { formatMeetingTime, timeZoneChoices } from "@/lib/packets/meeting-time";
import { ensureMailWorker } from "@/lib/mail/delivery";
import { Card } from "@/components/ui/card";
import { Badge } from "@/components/ui/badge";
import { ActionButton, ScheduleMeetingForm } from "@/components/meetings/forms";
import { scheduleMeeting, sendDueReminders } from "./actions";
import type { MeetingListing } from "@/db/queries/meetings";

export const metadata: Metadata = { title: "DMC meetings" };

const STATUS_TONE = { scheduled: "teal", held: "lichen", cancelled: "neutral" } as const;

export default async function MeetingsPage({ params }: { params: Promise<{ trialId: string }> }) {
  const trialId = parseId((await params).trialId);
  const { trial, principal } = await authorizePage(trialId, "viewOpen");
  const manage = allows(principal, "manageMeetings");
  // Due reminders and retries are the mail scheduler's (lib/mail/scheduler.ts), one sender for all processes.
  if (manage) ensureMailWorker();
  const [meetings, looks, recommendations, members] = await Promise.all([
    fetchMeetings(trial.id),
    fetchLookSchedule(trial.id),
    fetchRecommendationsOpen(trial.id),
    manage ? fetchMemberships({ trialId: trial.id }) : Promise.resolve([]),
  ]);
  const now = Date.now();
  const upcoming = meetings.filter((m) => new Date(m.scheduled_at).getTime() >= now && m.status === "scheduled").reverse();
  const past = meetings.filter((m) => !upcoming.includes(m));
  const byUser = new Map<number, { userId: number; name: string; roles: string[]; invite: boolean }>();
  for (const m of members) {
    const u = byUser.get(m.userId) ?? { userId: m.userId, name: `${m.userName} <${m.userEmail}>`, roles: [], invite: false };
    u.roles.push(ROLE_LABELS[m.role]);
    if (m.role === "dmc_member" || m.role === "unblinded_statistician" || m.role === "coordinator") u.invite = true;
    byUser.set(m.userId, u);
  }
  const nextLook = looks.find((l) => l.status === "locked") ?? looks.find((l) => l.status !== "reviewed");

  const row = (m: MeetingListing, showRecommendation: boolean) => {
    const rec = recommendations.find((r) => r.analysisId === m.analysis_id);
    return (
      <tr key={m.id}>
        <td><Link href={`/trials/${trial.id}/meetings/${m.id}`}>{formatMeetingTime(new Date(m.scheduled_at), m.time_zone)}</Link></td>
        <td>Look {m.lookNumber} <span className="text-stone-500">({ANALYSIS_STATUS_LABELS[m.analysisStatus as keyof typeof ANALYSIS_STATUS_LABELS]})</span></td>
        <td>{Number(m.attendeeCount)}</td>
        <td><Badge tone={STATUS_TONE[m.status]}>{m.status}</Badge></td>
        {showRecommendation ? <td>{rec ? DECISION_LABELS[rec.decision] : "none recorded"}</td> : null}
      </tr>
    );
  };

  return (
    <div className="grid grid-cols-1 gap-4 lg:grid-cols-3">
      <div className="flex flex-col gap-4 lg:col-span-2">
        <Card title="Upcoming meetings" actions={manage ? <ActionButton action={sendDueReminders} fields={{ trialId: trial.id }} label="Send due reminders" pendingLabel="Checking…" variant="secondary" /> : null}>
          {upcoming.length === 0 ? (
            <p className="text-sm text-stone-600">No meeting is scheduled.{manage ? " Schedule one with the form." : ""}</p>
          ) : (
            <table className="cairn-table" aria-label="Upcoming meetings">
              <thead><tr><th>When</th><th>Reviews</th><th>Invited</th><th>Status</th></tr></thead>
              <tbody>{upcoming.map((m) => row(m, false))}</tbody>
            </table>
          )}
        </Card>
        <Card title="Past and cancelled meetings">
          {past.length === 0 ? (
            <p className="text-sm text-stone-600">No past meetings yet.</p>
          ) : (
            <table className="cairn-table" aria-label="Past meetings">
              <thead><tr><th>When</th><th>Reviews</th><th>Invited</th><th>Status</th><th>Recommendation for that look</th></tr></thead>
              <tbody>{past.map((m) => row(m, true))}</tbody>
            </table>
          )}
        </Card>
      </div>
      {manage ? (
        <Card title="Schedule a meeting">
          {looks.length === 0 ? (
            <p className="text-sm text-stone-600">This trial has no planned looks yet: they are created when the design is locked.</p>
          ) : (
            <ScheduleMeetingForm
              action={scheduleMeeting}
              trialId={trial.id}
              analyses={looks.map((l) => ({ id: l.id, label: `Look ${l.look_number} (${l.planned_n} patients, ${ANALYSIS_STATUS_LABELS[l.status].toLowerCase()})` }))}
              defaultAnalysisId={nextLook?.id ?? null}
              members={[...byUser.values()].map((u) => ({ userId: u.userId, label: `${u.name}: ${u.roles.join(", ")}`, invitedByDefault: u.invite }))}
              zones={timeZoneChoices()}
            />
          )}
        </Card>
      ) : null}
    </div>
  );
}
