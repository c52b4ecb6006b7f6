import type { EmailKind } from "@/db/types";
import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { authorizePage, allows } from "@/lib/auth";
import { parseId } from "@/lib/route-params";
import { fetchAttendees, fetchMeeting } from "@/db/queries/meetings";
import { fetchPackets } from "@/db/queries/packets";
import { fetchEmailsForMeeting } from "@/db/queries/emails";
import { fetchRecommendationsOpen } from "@/db/queries/open-status";
import { ROLE_LABELS } from "@/lib/auth/permissions";
import { DECISION_LABELS } from "@/lib/format";
import { formatMeetingTime } from "@/lib/packets/meeting-time";
import { Card } from "@/components/ui/card";
import { Badge } from "@/components/ui/badge";
import { ActionButton, AttendanceForm, DeliveryAutoRefresh } from "@/components/meetings/forms";
import { cancelMeeting, generateOpenPacketAction, retryFailedEmail, saveAttendance, sendPacket } from "../actions";

export const metadata: Metadata = { title: "DMC meeting" };

const KIND_LABELS: Record<EmailKind, string> = { packet_open: "Open report (attached)", packet_closed_notice: "Closed report (link)", meeting_reminder: "Reminder", password_link: "Set-password link", password_changed: "Password changed", recommendation_letter: "Recommendation letter (attached)" };
const STATUS_TONES = { queued: "amber", sending: "amber", sent: "lichen", failed: "berry" } as const;

/** A UTC time stamp, independent of the server's own time zone. */
const utc = (d: Date | string) => new Date(d).toISOString().slice(0, 16).replace("T", " ");

export default async function MeetingPage({ params }: { params: Promise<{ trialId: string; meetingId: string }> }) {
  const p = await params;
  const trialId = parseId(p.trialId);
  const meetingId = parseId(p.meetingId);
  const access = await authorizePage(trialId, "viewOpen");
  const { trial, principal, unblinded } = access;
  const meeting = await fetchMeeting(trial.id, meetingId);
  if (!meeting) notFound();
  const manage = allows(principal, "manageMeetings");
  // Blinded roles are never sent closed packet metadata (its hash derives from closed data).
  const [attendees, openPackets, closedPackets, emails, recommendations] = await Promise.all([
    fetchAttendees(meeting.id),
    fetchPackets(meeting.id, ["open"]),
    fetchPackets(meeting.id, ["closed"]),
    manage ? fetchEmailsForMeeting(meeting.id) : Promise.resolve([]),
    fetchRecommendationsOpen(trial.id),
  ]);
  // The closed agenda and the closed packet are handled on the closed review of the look, which only
  // unblinded roles reach: this page (open to blinded organisers) imports no closed query at all.
  const closedReview = `/trials/${trial.id}/review/${meeting.analysis_id}#closed-packet`;
  const prepareClosed = unblinded && manage;
  const when = new Date(meeting.scheduled_at);
  const started = when.getTime() <= Date.now();
  const recommendation = recommendations.find((r) => r.analysisId === meeting.analysis_id);
  const base = `/api/trials/${trial.id}/meetings/${meeting.id}/packets`;
  const inFlight = emails.some((e) => e.status === "queued" || e.status === "sending");
  const hidden = { trialId: trial.id, meetingId: meeting.id };

  return (
    <div className="flex flex-col gap-4">
      <p className="text-sm"><Link href={`/trials/${trial.id}/meetings`}>← All meetings</Link></p>
      <div className="grid grid-cols-1 gap-4 lg:grid-cols-3">
        <Card title="Meeting" className="lg:col-span-2">
          <dl className="grid grid-cols-[minmax(0,9rem)_minmax(0,1fr)] gap-x-2 gap-y-1 text-sm sm:grid-cols-[12rem_minmax(0,1fr)]">
            <dt className="text-stone-500">When</dt>
            <dd data-testid="meeting-when">{formatMeetingTime(when, meeting.time_zone)}</dd>
            <dt className="text-stone-500">In UTC</dt>
            <dd>{utc(when)} UTC</dd>
            <dt className="text-stone-500">Reviews</dt>
            <dd>Look {meeting.lookNumber}</dd>
            <dt className="text-stone-500">Status</dt>
            <dd><Badge tone={meeting.status === "held" ? "lichen" : meeting.status === "cancelled" ? "neutral" : "teal"}>{meeting.status}</Badge></dd>
            <dt className="text-stone-500">Reminder</dt>
            <dd>{meeting.reminder_days_before} days before{meeting.reminder_sent_at ? ` (sent ${utc(meeting.reminder_sent_at)} UTC)` : ""}</dd>
            <dt className="text-stone-500">Recommendation made</dt>
            <dd>{recommendation ? `${DECISION_LABELS[recommendation.decision]} (signed by ${recommendation.signerName})${recommendation.superseded ? ", superseded: the look was reopened for a correction" : ""}` : "none recorded for this look"}</dd>
          </dl>
          <p className="mt-3 text-sm">
            <Link href={`/trials/${trial.id}/meetings/${meeting.id}/committee`} data-testid="committee-meeting-link">Committee: sessions, declarations, minutes and the letter to the sponsor</Link>
            {unblinded ? <> · <Link href={`/trials/${trial.id}/meetings/${meeting.id}/closed-session`}>Closed session: votes and the committee&apos;s recommendation</Link></> : null}
          </p>
          <h3 className="mt-4 text-sm font-semibold">Open session agenda</h3>
          <p className="whitespace-pre-wrap text-sm text-stone-700">{meeting.open_agenda || "None entered."}</p>
          {unblinded ? (
            <p className="mt-3 text-sm"><Link href={closedReview}>Closed session agenda (on the closed review of look {meeting.lookNumber})</Link></p>
          ) : manage ? (
            <p className="mt-3 text-xs text-stone-500">The closed session agenda is shown only to the DMC and the unblinded statistician.</p>
          ) : null}
        </Card>
        <Card title="Attendees">
          {attendees.length === 0 ? <p className="text-sm text-stone-600">Nobody is invited.</p> : null}
          {manage && started && meeting.status !== "cancelled" ? (
            <AttendanceForm action={saveAttendance} trialId={trial.id} meetingId={meeting.id} rowVersion={meeting.row_version} attendees={attendees.map((a) => ({ userId: a.userId, label: `${a.name} (${a.roles.map((r) => ROLE_LABELS[r]).join(", ")})`, attended: a.attended }))} />
          ) : (
            <ul className="flex flex-col gap-1 text-sm" aria-label="Attendees">
              {attendees.map((a) => (
                <li key={a.userId}>
                  {a.name} <span className="text-stone-500">({a.roles.map((r) => ROLE_LABELS[r]).join(", ")})</span>{" "}
                  {a.attended === null ? null : a.attended ? <Badge tone="lichen">attended</Badge> : <Badge>absent</Badge>}
                </li>
              ))}
            </ul>
          )}
          {manage && meeting.status === "scheduled" && !started ? (
            <div className="mt-3">
              <ActionButton action={cancelMeeting} fields={{ ...hidden, rowVersion: meeting.row_version }} label="Cancel meeting" pendingLabel="Cancelling…" variant="quiet" confirm="Cancel this meeting?" />
            </div>
          ) : null}
        </Card>
      </div>

      <Card title="Meeting packet" actions={manage && meeting.status !== "cancelled" ? <ActionButton action={generateOpenPacketAction} fields={hidden} label="Generate open report" pendingLabel="Generating PDF…" variant="secondary" /> : null}>
        <div id="packets" className="grid grid-cols-1 gap-4 md:grid-cols-2">
          <div>
            <h3 className="text-sm font-semibold">Open report <span className="font-normal text-stone-500">(everyone on the trial)</span></h3>
            {openPackets.length === 0 ? <p className="text-sm text-stone-600">Not generated yet.</p> : null}
            <ul className="mt-1 flex flex-col gap-1 text-sm" aria-label="Open report versions">
              {openPackets.map((pk) => (
                <li key={pk.id}>
                  <a href={`${base}/${pk.id}`} download>Open report v{pk.version}</a>{" "}
                  <span className="text-stone-500">· {pk.page_count} pages · {utc(pk.created_at)} UTC · engine {pk.engine_version} · SHA-256 <code title={pk.content_hash}>{pk.content_hash.slice(0, 12)}…</code></span>
                </li>
              ))}
            </ul>
          </div>
          <div>
            <h3 className="text-sm font-semibold">Closed report <span className="font-normal text-stone-500">(DMC members and the unblinded statistician)</span></h3>
            {closedPackets.length === 0 ? <p className="text-sm text-stone-600">Not prepared yet.</p> : null}
            <ul className="mt-1 flex flex-col gap-1 text-sm" aria-label="Closed report versions">
              {closedPackets.map((pk) =>
                unblinded ? (
                  <li key={pk.id}>
                    <a href={`${base}/${pk.id}`} download>Closed report v{pk.version}</a>{" "}
                    <span className="text-stone-500">· {pk.page_count} pages · {utc(pk.created_at)} UTC · engine {pk.engine_version} · SHA-256 <code title={pk.content_hash}>{pk.content_hash.slice(0, 12)}…</code></span>
                  </li>
                ) : (
                  <li key={pk.id}>Closed report v{pk.version} <span className="text-stone-500">· {utc(pk.created_at)} UTC · only unblinded roles can open it</span></li>
                ),
              )}
            </ul>
            {prepareClosed && meeting.status !== "cancelled" ? (
              <p className="mt-2 text-sm">
                <Link href={closedReview} data-testid="prepare-closed-link">Prepare the closed report from the closed review of look {meeting.lookNumber}</Link>
              </p>
            ) : !unblinded && manage ? (
              <p className="mt-2 text-xs text-stone-500">The unblinded statistician prepares the closed report from the closed review.</p>
            ) : null}
          </div>
        </div>
        {manage && openPackets.length > 0 && meeting.status !== "cancelled" ? (
          <div className="mt-4 max-w-xl">
            <p className="mb-2 text-sm text-stone-600">Sending e-mails the latest open report as a PDF to the sponsor and the coordinator, and a link to the latest closed report to DMC members and the unblinded statistician. Closed results never travel by e-mail.</p>
            <ActionButton action={sendPacket} fields={hidden} label="Send packet by e-mail" pendingLabel="Recording messages…" />
          </div>
        ) : null}
      </Card>

      {manage ? (
        <Card title="E-mail delivery">
          <DeliveryAutoRefresh active={inFlight} />
          {emails.length === 0 ? (
            <p className="text-sm text-stone-600">No e-mail has been sent for this meeting.</p>
          ) : (
            <table className="cairn-table" aria-label="E-mail delivery">
              <thead><tr><th>To</th><th>What</th><th>Subject</th><th>Status</th><th>Tries</th><th>Last error</th><th><span className="sr-only">Actions</span></th></tr></thead>
              <tbody>
                {emails.map((e) => (
                  <tr key={e.id} data-testid="email-row">
                    <td>{e.to_address}</td>
                    <td>{KIND_LABELS[e.kind]}{e.packetVersion ? ` v${e.packetVersion}` : ""}</td>
                    <td className="max-w-xs truncate" title={e.subject}>{e.subject}</td>
                    <td>
                      <Badge tone={STATUS_TONES[e.status]}>{e.status === "queued" && e.attempts > 0 ? "retrying" : e.status}</Badge>
                      {e.sent_at ? <span className="block text-xs text-stone-500">{utc(e.sent_at)} UTC</span> : null}
                      {e.status === "queued" && e.next_attempt_at && e.attempts > 0 ? <span className="block text-xs text-stone-500">next try {utc(e.next_attempt_at)} UTC</span> : null}
                    </td>
                    <td>{e.attempts}</td>
                    <td className="max-w-xs text-xs text-berry-700">{e.last_error ?? ""}</td>
                    <td>{e.status === "failed" ? <ActionButton action={retryFailedEmail} fields={{ trialId: trial.id, emailId: e.id }} label="Send again" pendingLabel="Sending…" variant="quiet" /> : null}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          )}
        </Card>
      ) : null}
    </div>
  );
}
