import type { Metadata } from "next";
import Link from "next/link";
import { authorizePage, allows } from "@/lib/auth";
import { parseId } from "@/lib/route-params";
import { fetchCommittee, isVoting, quorumInForce } from "@/db/queries/committee";
import { fetchMeetings } from "@/db/queries/meetings";
import { fetchMemberships } from "@/db/queries/memberships";
import { fetchLockedDesign } from "@/db/queries/designs";
import { ROLE_LABELS } from "@/lib/auth/permissions";
import { COMMITTEE_ROLE_LABELS } from "@/lib/committee/schemas";
import { formatMeetingTime } from "@/lib/packets/meeting-time";
import { Card } from "@/components/ui/card";
import { Badge } from "@/components/ui/badge";
import { CommitteeForm } from "@/components/committee/committee-form";
import { addCommitteeMemberAction, changeCommitteeChairAction, setCharterQuorumAction } from "./actions";
import { fetchDesignVersions } from "@/db/queries/open-status";

export const metadata: Metadata = { title: "Data monitoring committee" };

/** The trial's DMC (open to everyone on the trial): members, chair, quorum, and each meeting's committee pages. */
export default async function CommitteePage({ params }: { params: Promise<{ trialId: string }> }) {
  const trialId = parseId((await params).trialId);
  const { trial, principal, unblinded, reader } = await authorizePage(trialId, "viewOpen");
  const manage = allows(principal, "manageCommittee");
  const editDesign = allows(principal, "editDesign");
  const [committee, meetings, charter, memberships, versions] = await Promise.all([
    fetchCommittee(trial.id),
    fetchMeetings(trial.id),
    fetchLockedDesign(trial.id, reader),
    manage ? fetchMemberships({ trialId: trial.id }) : Promise.resolve([]),
    fetchDesignVersions(trial.id, reader),
  ]);
  const draft = versions.find((v) => v.status === "draft");
  const voting = committee.filter(isVoting);
  const charterQuorum = charter?.dmc_quorum ?? null;
  const seated = new Set(committee.map((m) => m.userId));
  const candidates = memberships.filter((m) => !seated.has(m.userId) && (m.role === "dmc_member" || m.role === "unblinded_statistician"));
  return (
    <div className="flex flex-col gap-4">
      <Card title="Data monitoring committee">
        {committee.length === 0 ? (
          <p className="text-sm text-stone-600">No committee is set up for this trial: a DMC member records the recommendation alone.</p>
        ) : (
          <>
            <table className="cairn-table" aria-label="Committee members">
              <thead><tr><th>Member</th><th>Place</th></tr></thead>
              <tbody>
                {committee.map((m) => (
                  <tr key={m.id} data-testid="committee-member">
                    <td>{m.name}</td>
                    <td>{m.role === "chair" ? <Badge tone="teal">{COMMITTEE_ROLE_LABELS.chair}</Badge> : COMMITTEE_ROLE_LABELS[m.role]}</td>
                  </tr>
                ))}
              </tbody>
            </table>
            <p className="mt-2 text-sm" data-testid="committee-quorum">
              Quorum: {quorumInForce(charterQuorum, voting.length)} voting members present in the closed session
              {charterQuorum === null ? " (a majority of the voting members: the charter version sets no quorum)" : ` (charter, design version ${charter?.version})`}. {voting.length} voting members.
            </p>
          </>
        )}
      </Card>

      {editDesign ? (
        <Card title="Quorum in the charter">
          {draft ? (
            <CommitteeForm
              action={setCharterQuorumAction}
              label="Quorum in the draft design"
              hidden={{ trialId: trial.id }}
              fields={[{ kind: "select", name: "quorum", label: `Voting members present needed (written into draft design version ${draft.version})`, options: Array.from({ length: 12 }, (_, i) => ({ value: i + 1, label: String(i + 1) })) }]}
              submit="Write the quorum into the draft"
              pendingLabel="Saving…"
              variant="secondary"
            />
          ) : (
            <p className="text-sm text-stone-600">The quorum is part of the charter. To change it, start an amendment on the Design page (a new draft version), set the quorum here, then lock the amendment.</p>
          )}
        </Card>
      ) : null}

      {manage ? (
        <div className="grid gap-4 md:grid-cols-2">
          <Card title="Seat a member">
            <CommitteeForm
              action={addCommitteeMemberAction}
              label="Seat a committee member"
              hidden={{ trialId: trial.id }}
              fields={[
                { kind: "select", name: "userId", label: "Person (a DMC member or the unblinded statistician of this trial)", options: candidates.map((m) => ({ value: m.userId, label: `${m.userName} (${ROLE_LABELS[m.role]})` })) },
                { kind: "select", name: "role", label: "Place on the committee", options: Object.entries(COMMITTEE_ROLE_LABELS).map(([value, label]) => ({ value, label })) },
              ]}
              submit="Seat on the committee"
              pendingLabel="Saving…"
            />
          </Card>
          <Card title="Change the chair">
            <p className="mb-2 text-sm text-stone-600">A trial has one chair. The former chair stays a voting member; the change is audited.</p>
            <CommitteeForm
              action={changeCommitteeChairAction}
              label="Change the chair"
              hidden={{ trialId: trial.id }}
              fields={[{ kind: "select", name: "memberId", label: "New chair", options: voting.filter((m) => m.role !== "chair").map((m) => ({ value: m.id, label: m.name })) }]}
              submit="Make chair"
              pendingLabel="Saving…"
              variant="secondary"
            />
          </Card>
        </div>
      ) : null}

      <Card title="Meetings">
        {meetings.length === 0 ? <p className="text-sm text-stone-600">No meeting has been scheduled.</p> : null}
        <ul className="flex flex-col gap-2 text-sm" aria-label="Committee meetings">
          {meetings.map((m) => (
            <li key={m.id}>
              Look {m.lookNumber} · {formatMeetingTime(new Date(m.scheduled_at), m.time_zone)} · <Badge>{m.status}</Badge>{" "}
              <Link href={`/trials/${trial.id}/meetings/${m.id}/committee`}>Sessions, declarations, minutes and letter</Link>
              {unblinded ? (
                <>
                  {" · "}
                  <Link href={`/trials/${trial.id}/meetings/${m.id}/closed-session`}>Closed session</Link>
                </>
              ) : null}
            </li>
          ))}
        </ul>
      </Card>
    </div>
  );
}
