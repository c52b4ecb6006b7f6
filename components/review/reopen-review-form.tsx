"use client";
/**
 * Correction after review: the unblinded statistician reopens a reviewed look with a reason and an
 * e-signature. A new review version starts; the recommendations already made stay linked to the
 * version they were made on and are shown as superseded. The reason is closed (DMC and unblinded
 * statistician only).
 */
import { startTransition, useActionState, useState, type FormEvent } from "react";
import { useRouter } from "next/navigation";
import { Button } from "@/components/ui/button";
import { Banner } from "@/components/ui/banner";
import { Field, TextArea, TextInput } from "@/components/ui/field";
import { callApi, jsonInit, type ApiFailure } from "@/lib/api-client";
import { CLOSED_FIELD_NOTE } from "@/lib/field-visibility";
import { FocusFirstInvalid } from "@/components/ui/focus-first-invalid";

type State = { ok?: string; failure?: ApiFailure };

export function ReopenReviewForm({ trialId, analysisId, rowVersion, lookNumber, reviewVersion, signerName }: { trialId: number; analysisId: number; rowVersion: number; lookNumber: number; reviewVersion: number; signerName: string }) {
  const router = useRouter();
  const [reason, setReason] = useState("");
  const [password, setPassword] = useState("");
  const [state, action, pending] = useActionState(async (_p: State, fd: FormData): Promise<State> => {
    const r = await callApi<{ reviewVersion: number }>(`/api/trials/${trialId}/analyses/${analysisId}/reopen`, jsonInit("POST", { rowVersion: fd.get("rowVersion"), reason: fd.get("reason"), password: fd.get("password") }));
    if (!r.ok) return { failure: r };
    router.refresh();
    return { ok: `Look ${lookNumber} is open for correction; review version ${r.data.reviewVersion} starts when it is locked again.` };
  }, {});
  // Each answer clears the password (every signature re-enters it), once, during render.
  const [answered, setAnswered] = useState(state);
  if (answered !== state) {
    setAnswered(state);
    setPassword("");
  }
  const fe = state.failure?.fieldErrors ?? {};
  const submit = (e: FormEvent<HTMLFormElement>) => {
    e.preventDefault();
    const fd = new FormData(e.currentTarget);
    startTransition(() => action(fd));
  };
  return (
    <form noValidate onSubmit={submit} className="flex flex-col gap-3" aria-label="Reopen this reviewed look for a correction">
      <FocusFirstInvalid after={state} />
      {state.ok ? <Banner tone="success">{state.ok}</Banner> : state.failure ? <Banner tone="danger" title="Not reopened">{state.failure.error}</Banner> : null}
      <input type="hidden" name="rowVersion" value={rowVersion} />
      <p className="text-sm text-stone-600">
        This look was reviewed under review version {reviewVersion}. Reopening it lets you correct its data; the recorded recommendations stay as they are and are marked superseded, and the DMC reviews the corrected look again.
      </p>
      <Field label="Reason for the correction" name="reason" id="reopen-reason" error={fe.reason} hint={CLOSED_FIELD_NOTE}>
        <TextArea id="reopen-reason" name="reason" rows={2} maxLength={1000} value={reason} onChange={(e) => setReason(e.target.value)} invalid={!!fe.reason} />
      </Field>
      <Field label="Password (electronic signature): review reopened for correction" name="password" id="reopen-password" error={fe.password} hint={`Signing as ${signerName}, meaning "review reopened for correction".`}>
        <TextInput id="reopen-password" name="password" type="password" autoComplete="current-password" maxLength={200} value={password} onChange={(e) => setPassword(e.target.value)} invalid={!!fe.password} />
      </Field>
      <div>
        <Button type="submit" variant="secondary" disabled={pending}>{pending ? "Signing…" : "Sign and reopen for correction"}</Button>
      </div>
    </form>
  );
}
