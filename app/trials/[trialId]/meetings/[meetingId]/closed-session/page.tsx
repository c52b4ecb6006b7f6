import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { authorizePage, closedConnection } from "@/lib/auth";
import { parseId } from "@/lib/route-params";
import { fetchMeeting } from "@/db/queries/meetings";
import { fetchCommittee, fetchDeclarations, isVoting } from "@/db/queries/committee";
import { fetchClosedMinutes, fetchMeetingRecommendationsClosed, fetchVotes, tallyVotes } from "@/db/queries/committee-closed";
import { DECISION_LABELS } from "@/lib/format";
import type { RecommendationDecision } from "@/db/types";
import { Card } from "@/components/ui/card";
import { Badge } from "@/components/ui/badge";
import { CommitteeForm } from "@/components/committee/committee-form";
import { MinutesCard } from "@/components/committee/minutes-card";
import { approveMinutesAction, saveClosedMinutesAction } from "../committee/actions";
import { castVoteAction, recordCommitteeRecommendationAction } from "./actions";

export const metadata: Metadata = { title: "Closed session" };

const utc = (d: Date | string) => new Date(d).toISOString().slice(0, 16).replace("T", " ");
const DECISIONS = Object.entries(DECISION_LABELS).map(([value, label]) => ({ value, label }));
const tallyText = (t: Partial<Record<RecommendationDecision, number>>) =>
  Object.entries(t).map(([d, n]) => `${DECISION_LABELS[d as RecommendationDecision]}: ${n}`).join(" · ") || "no votes";

/** CLOSED: the votes, the tally, the committee's recommendation and the closed minutes. DMC and unblinded statistician only. */
export default async function ClosedSessionPage({ params }: { params: Promise<{ trialId: string; meetingId: string }> }) {
  const p = await params;
  const trialId = parseId(p.trialId);
  const meetingId = parseId(p.meetingId);
  const access = await authorizePage(trialId, "viewClosed");
  const closed = closedConnection(access);
  const { trial, user } = access;
  const meeting = await fetchMeeting(trial.id, meetingId, closed);
  if (!meeting) notFound();
  const [committee, declarations, votes, recommendations, minutes] = await Promise.all([
    fetchCommittee(trial.id, closed),
    fetchDeclarations(meeting.id, closed),
    fetchVotes(meeting.id, closed),
    fetchMeetingRecommendationsClosed(meeting.id, closed),
    fetchClosedMinutes(meeting.id, closed),
  ]);
  const seat = committee.find((m) => m.userId === user.id);
  const isChair = seat?.role === "chair";
  const tally = tallyVotes(votes);
  const myDeclaration = declarations.find((d) => d.userId === user.id);
  const mayVote = seat && isVoting(seat) && myDeclaration && !myDeclaration.hasConflict && !votes.some((v) => v.userId === user.id);
  const current = recommendations.find((r) => !r.correctedById && !r.superseded);
  const live = meeting.status !== "cancelled";
  const hidden = { trialId: trial.id, meetingId: meeting.id };

  return (
    <div className="flex flex-col gap-4">
      <p className="text-sm"><Link href={`/trials/${trial.id}/meetings/${meeting.id}/committee`}>← Sessions, declarations, minutes and letter</Link></p>
      <Card title={`Closed session: look ${meeting.lookNumber}`}>
        <p className="text-xs text-berry-700">Closed: only the DMC and the unblinded statistician read this page.</p>
        <table className="cairn-table mt-2" aria-label="Votes">
          <thead><tr><th>Member</th><th>Vote</th><th>Comment</th><th>Signed</th></tr></thead>
          <tbody>
            {committee.filter(isVoting).map((m) => {
              const v = votes.find((x) => x.userId === m.userId);
              const d = declarations.find((x) => x.userId === m.userId);
              return (
                <tr key={m.id} data-testid="vote-row">
                  <td>{m.name}{m.role === "chair" ? " (chair)" : ""}</td>
                  <td>{v ? DECISION_LABELS[v.decision] : d?.hasConflict ? "does not vote (declared conflict)" : "not voted"}</td>
                  <td className="whitespace-pre-wrap">{v?.comment ?? ""}</td>
                  <td>{v ? `${utc(v.signedAt)} UTC` : ""}</td>
                </tr>
              );
            })}
          </tbody>
        </table>
        <p className="mt-2 text-sm" data-testid="vote-tally">Tally: {tallyText(tally)}</p>
        {mayVote && live ? (
          <div className="mt-3 max-w-xl">
            <CommitteeForm
              action={castVoteAction}
              label="Your vote"
              hidden={hidden}
              fields={[
                { kind: "select", name: "decision", label: "Your vote", options: DECISIONS, placeholder: "Choose your vote" },
                { kind: "textarea", name: "comment", label: "Comment (optional)", hint: "Closed: only the DMC and the unblinded statistician read this.", rows: 2 },
                { kind: "password", name: "password", label: "Password (electronic signature)" },
              ]}
              submit="Sign my vote"
              pendingLabel="Signing…"
            />
          </div>
        ) : seat && isVoting(seat) && !myDeclaration ? (
          <p className="mt-2 text-sm">Declare your conflicts of interest on the <Link href={`/trials/${trial.id}/meetings/${meeting.id}/committee`}>meeting&apos;s page</Link> before voting.</p>
        ) : null}
      </Card>

      <Card title="The committee's recommendation">
        <ul className="flex flex-col gap-2 text-sm" aria-label="Committee recommendations">
          {recommendations.map((r) => (
            <li key={r.id} data-testid="committee-recommendation">
              <p className="font-medium">{DECISION_LABELS[r.decision]} {r.correctedById ? <Badge>corrected</Badge> : r.superseded ? <Badge tone="amber">superseded</Badge> : null}</p>
              <p>Tally: {r.tally ? tallyText(r.tally) : "none"}{r.dissent ? ` · Dissent: ${r.dissent}` : ""}</p>
              <p className="whitespace-pre-wrap text-stone-700">{r.rationale}</p>
              <p className="text-stone-500">signed by {r.signerName} · {utc(r.recordedAt)} UTC</p>
            </li>
          ))}
        </ul>
        {recommendations.length === 0 ? <p className="text-sm text-stone-600">Not recorded yet.</p> : null}
        {isChair && live ? (
          <div className="mt-3 max-w-xl">
            <CommitteeForm
              action={recordCommitteeRecommendationAction}
              label={current ? "Record a correction of the committee's recommendation" : "Record the committee's recommendation"}
              hidden={{ ...hidden, correctsId: current?.id ?? "" }}
              fields={[
                { kind: "select", name: "decision", label: "Committee's recommendation", options: DECISIONS, placeholder: "Choose the committee's recommendation" },
                { kind: "textarea", name: "rationale", label: "Rationale", hint: "Closed: only the DMC and the unblinded statistician read this.", rows: 3 },
                { kind: "textarea", name: "dissent", label: "Dissent (optional)", hint: "Closed: the minority view, when the vote was not unanimous.", rows: 2 },
                { kind: "password", name: "password", label: "Password (electronic signature)" },
              ]}
              submit="Sign for the committee"
              pendingLabel="Signing…"
            />
            <p className="mt-2 text-xs text-stone-500">Refused unless the closed session was quorate and no voter declared a conflict. The tally is taken from the signed votes.</p>
          </div>
        ) : null}
      </Card>

      <MinutesCard session="closed" minutes={minutes} hidden={hidden} mayDraft={live} mayApprove={isChair} saveAction={saveClosedMinutesAction} approveAction={approveMinutesAction} />
    </div>
  );
}
