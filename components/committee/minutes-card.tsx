/**
 * The minutes of one session of a committee meeting (open or closed): every version with its state,
 * the draft form for those who may draft and the approval form for the chair. The page passes in its
 * server actions and decides who may draft; the session decides the words.
 */
import { Card } from "@/components/ui/card";
import { Badge } from "@/components/ui/badge";
import { CommitteeForm } from "@/components/committee/committee-form";
import type { CommitteeFormState } from "@/lib/committee/schemas";

type Action = (prev: CommitteeFormState, form: FormData) => Promise<CommitteeFormState>;
type MinutesRow = { id: number; version: number; body: string; approved: boolean; approvedBy: string | null; rowVersion: number };

const WORDS = {
  open: { title: "Open", lower: "open", hint: "Open: everyone on the trial, blinded roles included, reads the open minutes." },
  closed: { title: "Closed", lower: "closed", hint: "Closed: only the DMC and the unblinded statistician read this." },
} as const;

export function MinutesCard({ session, minutes, hidden, mayDraft, mayApprove, saveAction, approveAction }: {
  session: "open" | "closed";
  /** Newest first. */
  minutes: MinutesRow[];
  hidden: { trialId: number; meetingId: number };
  /** Whether the draft form is shown (the meeting is live and the viewer may draft). */
  mayDraft: boolean;
  /** Whether the approval form is shown when there is a draft (the chair). */
  mayApprove: boolean;
  saveAction: Action;
  approveAction: Action;
}) {
  const w = WORDS[session];
  const latestDraft = minutes[0] && !minutes[0].approved ? minutes[0] : null;
  return (
    <Card title={`${w.title} session minutes`}>
      <ul className="flex flex-col gap-3 text-sm" aria-label={`${w.title} minutes versions`}>
        {minutes.map((m) => (
          <li key={m.id} data-testid={`${session}-minutes-version`}>
            <p className="font-medium">Version {m.version} {m.approved ? <Badge tone="lichen">approved by {m.approvedBy}</Badge> : <Badge tone="amber">draft</Badge>}</p>
            <p className="whitespace-pre-wrap text-stone-700">{m.body}</p>
          </li>
        ))}
      </ul>
      {minutes.length === 0 ? <p className="text-sm text-stone-600">No {w.lower} minutes yet.</p> : null}
      {mayDraft ? (
        <div className="mt-3 max-w-2xl">
          <CommitteeForm
            action={saveAction}
            label={`Draft the ${w.lower} minutes`}
            hidden={{ ...hidden, rowVersion: latestDraft?.rowVersion ?? "" }}
            fields={[{ kind: "textarea", name: "body", label: latestDraft ? `${w.title} minutes (editing draft version ${latestDraft.version})` : minutes.length ? `${w.title} minutes (a correction: a new version)` : `${w.title} minutes`, hint: w.hint, rows: 6, defaultValue: latestDraft?.body ?? minutes[0]?.body ?? "" }]}
            submit="Save draft"
            pendingLabel="Saving…"
            variant="secondary"
          />
        </div>
      ) : null}
      {mayApprove && latestDraft ? (
        <div className="mt-3 max-w-md">
          <CommitteeForm action={approveAction} label={`Approve the ${w.lower} minutes`} hidden={{ ...hidden, session }} fields={[{ kind: "password", name: "password", label: "Password (electronic signature)" }]} submit={`Approve version ${latestDraft.version}`} pendingLabel="Signing…" />
        </div>
      ) : null}
    </Card>
  );
}
