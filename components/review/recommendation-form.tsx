"use client";
import { startTransition, useActionState, useState } from "react";
import type { RecommendationFormState } from "@/lib/review/recommendation-schema";
import { Button } from "@/components/ui/button";
import { Banner } from "@/components/ui/banner";
import { Field, SelectInput, TextArea, TextInput } from "@/components/ui/field";
import { DECISION_LABELS } from "@/lib/format";
import { CLOSED_FIELD_NOTE } from "@/lib/field-visibility";
import { FocusFirstInvalid } from "@/components/ui/focus-first-invalid";

const initial: RecommendationFormState = {};

/** The committee's recommendation, signed with the member's password (e-signature). */
export function RecommendationForm({ trialId, analysisId, correctsId, signerName, recordAction }: {
  trialId: number;
  analysisId: number;
  correctsId: number | null;
  signerName: string;
  /** The page's server action; passed in so components never import from app/. */
  recordAction: (prev: RecommendationFormState, form: FormData) => Promise<RecommendationFormState>;
}) {
  const [state, action, pending] = useActionState(recordAction, initial);
  const fe = state.fieldErrors ?? {};
  // Submitted by hand, not through the form's action prop: React resets a form after an action,
  // and a reset select would fall back to its first option while the screen still showed the
  // member's choice, so a second attempt could sign a decision nobody chose. Fields are
  // controlled; the password is cleared after every attempt so each signature re-enters it.
  const [decision, setDecision] = useState("");
  const [rationale, setRationale] = useState("");
  const [password, setPassword] = useState("");
  // Each answer of the action is a new object: react to it once, during render (React's pattern
  // for state that follows other state), not in an effect that would render twice.
  const [answered, setAnswered] = useState(state);
  if (answered !== state) {
    setAnswered(state);
    setPassword("");
    if (state.ok) {
      setDecision("");
      setRationale("");
    }
  }
  const submit = (e: React.FormEvent<HTMLFormElement>) => {
    e.preventDefault();
    const data = new FormData(e.currentTarget);
    startTransition(() => action(data));
  };
  return (
    <form noValidate onSubmit={submit} className="flex flex-col gap-3" aria-label={correctsId ? "Record a correction" : "Record the recommendation"}>
      <FocusFirstInvalid after={state} />
      {state.ok ? <Banner tone="success">{state.ok}</Banner> : state.error ? <Banner tone="danger">{state.error}</Banner> : null}
      <input type="hidden" name="trialId" value={trialId} />
      <input type="hidden" name="analysisId" value={analysisId} />
      <input type="hidden" name="correctsId" value={correctsId ?? ""} />
      {correctsId ? <p className="text-sm text-stone-600">The recorded recommendation stays as it was; this entry corrects it and is linked to it.</p> : null}
      <Field label="Committee's recommendation" name="decision" error={fe.decision}>
        <SelectInput id="decision" name="decision" value={decision} onChange={(e) => setDecision(e.target.value)} invalid={!!fe.decision}>
          <option value="" disabled>
            Choose a recommendation
          </option>
          {Object.entries(DECISION_LABELS).map(([k, v]) => (
            <option key={k} value={k}>
              {v}
            </option>
          ))}
        </SelectInput>
      </Field>
      <Field label="Rationale" name="rationale" error={fe.rationale} hint={CLOSED_FIELD_NOTE}>
        <TextArea id="rationale" name="rationale" rows={4} maxLength={4000} value={rationale} onChange={(e) => setRationale(e.target.value)} invalid={!!fe.rationale} />
      </Field>
      <Field label="Password (electronic signature): recommendation recorded" name="password" error={fe.password} hint={`Signing as ${signerName}, meaning "recommendation recorded".`}>
        <TextInput id="password" name="password" type="password" autoComplete="current-password" maxLength={200} value={password} onChange={(e) => setPassword(e.target.value)} invalid={!!fe.password} />
      </Field>
      <Button type="submit" disabled={pending}>{pending ? "Signing…" : correctsId ? "Sign and record the correction" : "Sign and record"}</Button>
    </form>
  );
}
