import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { authorizePage, allows } from "@/lib/auth";
import { parseId } from "@/lib/route-params";
import { fetchMeeting } from "@/db/queries/meetings";
import { fetchMemberships } from "@/db/queries/memberships";
import { fetchEmailsForMeeting } from "@/db/queries/emails";
import { fetchCharterQuorum, fetchCommittee, fetchDeclarations, fetchLetters, fetchMeetingRecommendationOpen, fetchOpenMinutes, fetchSessionAttendance, isVoting, quorumInForce } from "@/db/queries/committee";
import { ROLE_LABELS } from "@/lib/auth/permissions";
import { DECISION_LABELS } from "@/lib/format";
import { COMMITTEE_ROLE_LABELS } from "@/lib/committee/schemas";
import { formatMeetingTime } from "@/lib/packets/meeting-time";
import type { RecommendationDecision } from "@/db/types";
import { Card } from "@/components/ui/card";
import { Badge } from "@/components/ui/badge";
import { CommitteeForm } from "@/components/committee/committee-form";
import { MinutesCard } from "@/components/committee/minutes-card";
import { approveMinutesAction, declareConflictsAction, recordClosedAttendanceAction, recordOpenAttendanceAction, saveOpenMinutesAction, sendLetterAction, signLetterAction } from "./actions";

export const metadata: Metadata = { title: "Committee meeting" };

const utc = (d: Date | string) => new Date(d).toISOString().slice(0, 16).replace("T", " ");

/**
 * The open side of a committee meeting, for everyone on the trial: attendance per session, the
 * declarations, the open minutes and the letter to the sponsor. Nothing closed is read here (votes,
 * tally and closed minutes are on the closed-session page, for unblinded roles only).
 */
export default async function MeetingCommitteePage({ params }: { params: Promise<{ trialId: string; meetingId: string }> }) {
  const p = await params;
  const trialId = parseId(p.trialId);
  const meetingId = parseId(p.meetingId);
  const access = await authorizePage(trialId, "viewOpen");
  const { trial, principal, unblinded, user } = access;
  const meeting = await fetchMeeting(trial.id, meetingId);
  if (!meeting) notFound();
  const [committee, attendance, declarations, minutes, letters, recommendation, charter, memberships] = await Promise.all([
    fetchCommittee(trial.id),
    fetchSessionAttendance(meeting.id),
    fetchDeclarations(meeting.id),
    fetchOpenMinutes(meeting.id),
    fetchLetters(meeting.id),
    fetchMeetingRecommendationOpen(meeting.id),
    fetchCharterQuorum(meeting.analysis_id),
    fetchMemberships({ trialId: trial.id }, access.reader),
  ]);
  const seat = committee.find((m) => m.userId === user.id);
  const isChair = seat?.role === "chair";
  const voting = committee.filter(isVoting);
  const required = quorumInForce(charter?.quorum ?? null, voting.length);
  const present = (session: "open" | "closed") => attendance.filter((a) => a.session === session && a.attended);
  const votingPresent = voting.filter((m) => present("closed").some((a) => a.userId === m.userId)).length;
  const live = meeting.status !== "cancelled";
  const started = new Date(meeting.scheduled_at).getTime() <= Date.now();
  const hidden = { trialId: trial.id, meetingId: meeting.id };
  const people = new Map<number, { name: string; roles: string[] }>();
  for (const m of memberships) {
    const e = people.get(m.userId) ?? { name: m.userName, roles: [] };
    e.roles.push(ROLE_LABELS[m.role]);
    people.set(m.userId, e);
  }
  const closedEligible = [...new Set([...committee.map((m) => m.userId), ...memberships.filter((m) => m.role === "unblinded_statistician").map((m) => m.userId)])];
  const mayDraft = allows(principal, "manageMeetings") || allows(principal, "recordRecommendation");
  const myDeclaration = declarations.find((d) => d.userId === user.id);
  const letterMail = isChair || allows(principal, "manageMeetings") ? (await fetchEmailsForMeeting(meeting.id)).filter((e) => e.kind === "recommendation_letter") : [];

  return (
    <div className="flex flex-col gap-4">
      <p className="text-sm">
        <Link href={`/trials/${trial.id}/committee`}>← Committee</Link>
        {unblinded ? <> · <Link href={`/trials/${trial.id}/meetings/${meeting.id}/closed-session`} data-testid="closed-session-link">Closed session: votes and the committee&apos;s recommendation</Link></> : null}
      </p>
      <Card title={`Committee meeting on look ${meeting.lookNumber}`}>
        <p className="text-sm">{formatMeetingTime(new Date(meeting.scheduled_at), meeting.time_zone)} · <Badge>{meeting.status}</Badge></p>
        <p className="mt-1 text-sm" data-testid="meeting-quorum">
          Closed session: {votingPresent} of {voting.length} voting members present; quorum {required}{charter?.quorum == null ? " (majority; the charter version sets none)" : ` (charter, design version ${charter.designVersion})`}.{" "}
          {votingPresent >= required ? <Badge tone="lichen">quorate</Badge> : <Badge tone="amber">not quorate</Badge>}
        </p>
        <p className="mt-1 text-sm" data-testid="meeting-decision">
          Committee&apos;s recommendation: {recommendation ? `${DECISION_LABELS[recommendation.decision as RecommendationDecision]} (recorded ${utc(recommendation.recordedAt)} UTC, signed by ${recommendation.signerName})` : "not recorded yet"}
        </p>
      </Card>

      <div className="grid gap-4 md:grid-cols-2">
        <Card title="Open session attendance">
          <ul className="mb-2 text-sm" aria-label="Present in the open session">{present("open").map((a) => <li key={a.userId}>{a.name}</li>)}</ul>
          {allows(principal, "manageMeetings") && live && started ? (
            <CommitteeForm action={recordOpenAttendanceAction} label="Open session attendance" hidden={hidden} fields={[{ kind: "checkboxes", name: "attendedIds", label: "Present in the open session", options: [...people.entries()].map(([id, e]) => ({ value: id, label: `${e.name} (${e.roles.join(", ")})`, checked: present("open").some((a) => a.userId === id) })) }]} submit="Record open session attendance" pendingLabel="Saving…" variant="secondary" />
          ) : null}
        </Card>
        <Card title="Closed session attendance">
          <ul className="mb-2 text-sm" aria-label="Present in the closed session">{present("closed").map((a) => <li key={a.userId}>{a.name}</li>)}</ul>
          {unblinded && live && started ? (
            <CommitteeForm action={recordClosedAttendanceAction} label="Closed session attendance" hidden={hidden} fields={[{ kind: "checkboxes", name: "attendedIds", label: "Present in the closed session (committee and unblinded statistician only)", options: closedEligible.map((id) => ({ value: id, label: people.get(id)?.name ?? committee.find((m) => m.userId === id)?.name ?? String(id), checked: present("closed").some((a) => a.userId === id) })) }]} submit="Record closed session attendance" pendingLabel="Saving…" variant="secondary" />
          ) : null}
        </Card>
      </div>

      <Card title="Conflict-of-interest declarations">
        <table className="cairn-table" aria-label="Declarations">
          <thead><tr><th>Member</th><th>Place</th><th>Declaration</th><th>Signed</th></tr></thead>
          <tbody>
            {voting.map((m) => {
              const d = declarations.find((x) => x.userId === m.userId);
              return (
                <tr key={m.id} data-testid="declaration-row">
                  <td>{m.name}</td>
                  <td>{COMMITTEE_ROLE_LABELS[m.role]}</td>
                  <td>{d ? (d.hasConflict ? <><Badge tone="amber">conflict declared</Badge> {d.statement} (does not vote on this look)</> : "No new conflicts") : "not declared yet"}</td>
                  <td>{d ? `${utc(d.declaredAt)} UTC` : ""}</td>
                </tr>
              );
            })}
          </tbody>
        </table>
        {seat && isVoting(seat) && !myDeclaration && live ? (
          <div className="mt-3 max-w-xl">
            <CommitteeForm
              action={declareConflictsAction}
              label="Your declaration"
              hidden={hidden}
              fields={[
                { kind: "radio", name: "hasConflict", label: "Conflicts of interest since the last meeting", options: [{ value: "no", label: "No new conflicts" }, { value: "yes", label: "I have a conflict (stated below); I will not vote on this look" }] },
                { kind: "textarea", name: "statement", label: "The conflict", hint: "Open: blinded roles (sponsor, coordinator, administrator) will read this.", rows: 2 },
                { kind: "password", name: "password", label: "Password (electronic signature)" },
              ]}
              submit="Sign the declaration"
              pendingLabel="Signing…"
            />
          </div>
        ) : null}
      </Card>

      <MinutesCard session="open" minutes={minutes} hidden={hidden} mayDraft={mayDraft && live} mayApprove={isChair} saveAction={saveOpenMinutesAction} approveAction={approveMinutesAction} />

      <Card title="Recommendation letter to the sponsor">
        <ul className="flex flex-col gap-1 text-sm" aria-label="Letter versions">
          {letters.map((l) => (
            <li key={l.id} data-testid="letter-version">
              <a href={`/api/trials/${trial.id}/meetings/${meeting.id}/letter?version=${l.version}`} download>Letter v{l.version}</a>{" "}
              <span className="text-stone-500">· signed by {l.signerName} · {utc(l.createdAt)} UTC · SHA-256 <code title={l.contentHash}>{l.contentHash.slice(0, 12)}…</code></span>
            </li>
          ))}
        </ul>
        {letters.length === 0 ? <p className="text-sm text-stone-600">No letter yet: the chair signs it once the committee&apos;s recommendation is recorded.</p> : null}
        {isChair && recommendation && live ? (
          <div className="mt-3 grid gap-4 md:grid-cols-2">
            <CommitteeForm action={signLetterAction} label="Sign the letter" hidden={hidden} fields={[{ kind: "password", name: "password", label: "Password (electronic signature)" }]} submit="Sign the letter" pendingLabel="Signing…" />
            {letters.length ? <CommitteeForm action={sendLetterAction} label="Send the letter" hidden={hidden} fields={[]} submit="E-mail the letter to the sponsor" pendingLabel="Recording messages…" variant="secondary" /> : null}
          </div>
        ) : null}
        {letterMail.length ? (
          <table className="cairn-table mt-3" aria-label="Letter delivery">
            <thead><tr><th>To</th><th>Status</th><th>Tries</th><th>Last error</th></tr></thead>
            <tbody>
              {letterMail.map((e) => (
                <tr key={e.id} data-testid="letter-email-row">
                  <td>{e.to_address}</td>
                  <td><Badge tone={e.status === "sent" ? "lichen" : e.status === "failed" ? "berry" : "amber"}>{e.status}</Badge>{e.sent_at ? ` ${utc(e.sent_at)} UTC` : ""}</td>
                  <td>{e.attempts}</td>
                  <td className="text-xs">{e.last_error ?? ""}</td>
                </tr>
              ))}
            </tbody>
          </table>
        ) : null}
        <p className="mt-2 text-xs text-stone-500">The letter states the trial, the look, the date and the decision with the caution. It carries no data and no votes.</p>
      </Card>
    </div>
  );
}
