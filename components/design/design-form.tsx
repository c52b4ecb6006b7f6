"use client";
/**
 * The design form: priors, rates, looks, monitoring rule, safety rule. Controlled by the design
 * studio (which validates with the zod design schema and shows each error next to its field).
 */
import type { ReactNode } from "react";
import { Field, Notation, SelectInput, TextInput } from "@/components/ui/field";
import { thresholdWord, type ThresholdKey } from "@/lib/design/threshold-labels";
import { PRIOR_FAMILY_LABELS, type DesignForm, type FieldErrors, type PriorFamily, type PriorForm } from "@/lib/design/form-model";
import { monitoringRuleLabel } from "@/lib/stats/labels";

type Props = {
  form: DesignForm;
  errors: FieldErrors;
  readOnly: boolean;
  armLabels: { single?: string; experimental?: string; control?: string };
  onChange: (f: DesignForm) => void;
};

function NumberField({ id, label, value, error, hint, onChange, readOnly }: { id: string; label: ReactNode; value: string; error?: string; hint?: string; onChange: (v: string) => void; readOnly: boolean }) {
  return (
    <Field label={label} name={id} error={error} hint={hint}>
      <TextInput id={id} name={id} inputMode="decimal" value={value} invalid={!!error} readOnly={readOnly} onChange={(e) => onChange(e.target.value)} autoComplete="off" />
    </Field>
  );
}

function Group({ title, children }: { title: string; children: ReactNode }) {
  return (
    <fieldset className="flex flex-col gap-3 rounded-md border border-stone-200 p-4">
      <legend className="px-1 text-sm font-semibold text-stone-800">{title}</legend>
      {children}
    </fieldset>
  );
}

function PriorFields({ prefix, title, prior, errors, readOnly, onChange }: { prefix: "prior" | "priorT" | "priorC" | "safetyPrior"; title: string; prior: PriorForm; errors: FieldErrors; readOnly: boolean; onChange: (p: PriorForm) => void }) {
  const set = (k: keyof PriorForm) => (v: string) => onChange({ ...prior, [k]: v });
  const err = (k: string) => errors[`${prefix}.${k}`];
  return (
    <div className="flex flex-col gap-3" data-testid={`${prefix}-fields`}>
      <Field label={title} name={`${prefix}-family`} error={errors[prefix]}>
        <SelectInput id={`${prefix}-family`} name={`${prefix}-family`} value={prior.family} aria-readonly={readOnly || undefined} onChange={(e) => onChange({ ...prior, family: e.target.value as PriorFamily })}>
          {(Object.keys(PRIOR_FAMILY_LABELS) as PriorFamily[]).map((f) => (
            <option key={f} value={f}>{PRIOR_FAMILY_LABELS[f]}</option>
          ))}
        </SelectInput>
      </Field>
      {prior.family === "beta" ? (
        <div className="grid grid-cols-2 gap-3">
          <NumberField id={`${prefix}-a`} label="a" value={prior.a} error={err("a")} onChange={set("a")} readOnly={readOnly} />
          <NumberField id={`${prefix}-b`} label="b" value={prior.b} error={err("b")} onChange={set("b")} readOnly={readOnly} />
        </div>
      ) : null}
      {prior.family === "informative" || prior.family === "robustMixture" ? (
        <div className="grid grid-cols-2 gap-3">
          <NumberField id={`${prefix}-mean`} label="Prior mean" value={prior.mean} error={err("mean")} onChange={set("mean")} readOnly={readOnly} />
          <NumberField
            id={`${prefix}-ess`}
            label={prior.family === "robustMixture" ? "Effective sample size of the informative part" : "Effective sample size"}
            hint={prior.family === "robustMixture" ? "The mixture's own effective sample size is shown under Priors." : undefined}
            value={prior.ess}
            error={err("ess")}
            onChange={set("ess")}
            readOnly={readOnly}
          />
        </div>
      ) : null}
      {prior.family === "robustMixture" ? (
        <NumberField id={`${prefix}-weight`} label="Weight on the informative part" value={prior.weight} error={err("weight")} hint="The rest goes to a vague Beta(1, 1)." onChange={set("weight")} readOnly={readOnly} />
      ) : null}
    </div>
  );
}

export function DesignFormFields({ form, errors, readOnly, armLabels, onChange: change }: Props) {
  // A read-only design (locked, superseded, or a draft the viewer may not edit) keeps every field
  // focusable and readable (WCAG 2.1.1, 1.3.1): text fields are readOnly, and choices ignore changes
  // (controlled, so a click leaves them as they are) and say aria-readonly. Not a disabled fieldset,
  // whose values a keyboard or screen-reader user could not reach.
  const onChange = readOnly ? () => undefined : change;
  const ro = readOnly || undefined;
  const set = <K extends keyof DesignForm>(k: K) => (v: DesignForm[K]) => onChange({ ...form, [k]: v });
  const predictive = form.ruleKind === "predictive";
  // A threshold's label: Cairn's words first, the published symbol small beside them.
  const rule = predictive ? "predictive" : "posterior";
  const tw = (key: ThresholdKey) => {
    const w = thresholdWord(key, rule);
    return (
      <>
        {w.word} <Notation>{w.symbol}</Notation>
      </>
    );
  };
  const num = (k: keyof DesignForm & string, label: ReactNode, hint?: string) => (
    <NumberField id={k} label={label} value={form[k] as string} error={errors[k]} hint={hint} onChange={(v) => onChange({ ...form, [k]: v })} readOnly={readOnly} />
  );
  return (
    <fieldset className="flex flex-col gap-4" aria-label="Design settings">
      {errors.form || errors.arms ? <p className="text-sm text-berry-700">{errors.form ?? errors.arms}</p> : null}
      {form.arms === "single" ? (
        <>
          <Group title="Prior and rates">
            <PriorFields prefix="prior" title={`Prior on the response rate${armLabels.single ? ` (${armLabels.single})` : ""}`} prior={form.prior} errors={errors} readOnly={readOnly} onChange={set("prior")} />
            <div className="grid grid-cols-2 gap-3">
              {num("p0", "p0, uninteresting rate", "Type I error is computed here.")}
              {num("p1", "p1, target rate", "Power is computed here.")}
            </div>
            {num("nMax", "Maximum sample size")}
          </Group>
        </>
      ) : (
        <Group title="Priors and rates">
          <PriorFields prefix="priorT" title={`Prior on the experimental arm${armLabels.experimental ? ` (${armLabels.experimental})` : ""}`} prior={form.priorT} errors={errors} readOnly={readOnly} onChange={set("priorT")} />
          <PriorFields prefix="priorC" title={`Prior on the control arm${armLabels.control ? ` (${armLabels.control})` : ""}`} prior={form.priorC} errors={errors} readOnly={readOnly} onChange={set("priorC")} />
          <div className="grid grid-cols-2 gap-3">
            {num("controlRate", "Control rate", "Assumed control response rate.")}
            {num("experimentalRate", "Experimental rate", "Power is computed at this rate.")}
          </div>
          <div className="grid grid-cols-2 gap-3">
            {num("delta", "Margin δ on pT − pC", "Negative for non-inferiority.")}
            {num("nMaxPerArm", "Maximum sample size per arm")}
          </div>
        </Group>
      )}
      <Group title="Planned looks">
        <div className="flex gap-4 text-sm" role="radiogroup" aria-label="How the looks are given" aria-readonly={ro}>
          <label className="flex items-center gap-2">
            <input type="radio" name="looksKind" checked={form.looksKind === "list"} onChange={() => set("looksKind")("list")} /> A list of enrolled counts
          </label>
          <label className="flex items-center gap-2">
            <input type="radio" name="looksKind" checked={form.looksKind === "every"} onChange={() => set("looksKind")("every")} /> Every k patients
          </label>
        </div>
        {form.looksKind === "list" ? (
          <Field label={form.arms === "two" ? "Looks at (patients per arm)" : "Looks at (patients enrolled)"} name="looksList" error={errors.looks} hint="Separated by commas; the final analysis at the maximum is always added.">
            <TextInput id="looksList" name="looksList" value={form.looksList} invalid={!!errors.looks} readOnly={readOnly} onChange={(e) => set("looksList")(e.target.value)} autoComplete="off" />
          </Field>
        ) : (
          <div className="grid grid-cols-2 gap-3">
            <NumberField id="looksFirst" label="First look at" value={form.looksFirst} error={errors.looksFirst ?? errors.looks} onChange={set("looksFirst")} readOnly={readOnly} />
            <NumberField id="looksEvery" label="Then every" value={form.looksEvery} error={errors.looksEvery} onChange={set("looksEvery")} readOnly={readOnly} />
          </div>
        )}
      </Group>
      <Group title="Monitoring rule">
        <Field label="Rule" name="ruleKind" error={errors.ruleKind}>
          <SelectInput id="ruleKind" name="ruleKind" value={form.ruleKind} aria-readonly={ro} onChange={(e) => set("ruleKind")(e.target.value as DesignForm["ruleKind"])}>
            <option value="predictive">Predictive probability of success (Lee &amp; Liu 2008)</option>
            <option value="posterior">{monitoringRuleLabel("posterior", form.arms)}</option>
            <option value="uncertainStandard">{monitoringRuleLabel("uncertainStandard", form.arms)}</option>
          </SelectInput>
        </Field>
        {form.ruleKind === "uncertainStandard" && form.arms === "single" ? (
          <div className="grid grid-cols-2 gap-3">
            {num("standardA", "Standard rate aS", "pS ~ Beta(aS, bS), e.g. from historical responders and non-responders.")}
            {num("standardB", "Standard rate bS", "Interims use P(pE > pS + δ | data), pS uncertain and independent of pE.")}
          </div>
        ) : null}
        {form.ruleKind === "uncertainStandard" && form.arms === "two" ? (
          <p className="text-xs text-stone-600">The control arm&apos;s posterior is the uncertain standard: interims use P(pT &gt; pC + δ | data).</p>
        ) : null}
        {num("thetaT", tw("thetaT"), form.arms === "single" ? "Success at the end if P(p > p0 | data) is above this bar." : "Success at the end if P(pT − pC > δ | data) is above this bar.")}
        {num("futilityThreshold", tw("futilityThreshold"), thresholdWord("futilityThreshold", rule).explain)}
        {form.arms === "single" && !predictive
          ? num("delta", "Margin δ for the interim rule", form.ruleKind === "uncertainStandard" ? "Interims use P(pE > pS + δ | data)." : "Interims use P(p > p0 + δ | data).")
          : null}
        <label className="flex items-center gap-2 text-sm">
          <input type="checkbox" checked={form.efficacyStopping} aria-readonly={ro} onChange={(e) => set("efficacyStopping")(e.target.checked)} /> Stop early for efficacy
        </label>
        {form.efficacyStopping ? num("efficacyThreshold", tw("efficacyThreshold"), thresholdWord("efficacyThreshold", rule).explain) : null}
      </Group>
      <Group title="Safety rule">
        <label className="flex items-center gap-2 text-sm">
          <input type="checkbox" checked={form.safetyOn} aria-readonly={ro} onChange={(e) => set("safetyOn")(e.target.checked)} /> Monitor toxicity{form.arms === "two" ? " (experimental arm)" : ""}
        </label>
        {form.safetyOn ? (
          <>
            <Field label="Compare the toxicity rate with" name="safetyKind" error={errors.safetyKind}>
              <SelectInput id="safetyKind" name="safetyKind" value={form.safetyKind} aria-readonly={ro} onChange={(e) => set("safetyKind")(e.target.value as DesignForm["safetyKind"])}>
                <option value="fixedLimit">A fixed toxicity ceiling</option>
                <option value="uncertainStandard">An uncertain standard rate plus a margin (Thall, Simon &amp; Estey 1995)</option>
              </SelectInput>
            </Field>
            {form.safetyKind === "uncertainStandard" ? (
              <>
                <div className="grid grid-cols-3 gap-3">
                  {num("safetyStandardA", "Standard toxicity aS")}
                  {num("safetyStandardB", "Standard toxicity bS")}
                  {num("safetyMargin", "Margin", "Extra toxicity tolerated above qS.")}
                </div>
                {num("thetaS", tw("thetaS"), "Raise the alarm if P(q > qS + margin | data) is above this level, qS ~ Beta(aS, bS).")}
              </>
            ) : (
              <div className="grid grid-cols-2 gap-3">
                {num("qmax", tw("qmax"), thresholdWord("qmax").explain)}
                {num("thetaS", tw("thetaS"), "Raise the alarm if P(q > ceiling | data) is above this level.")}
              </div>
            )}
            <PriorFields prefix="safetyPrior" title="Prior on the toxicity rate" prior={form.safetyPrior} errors={errors} readOnly={readOnly} onChange={set("safetyPrior")} />
          </>
        ) : null}
      </Group>
    </fieldset>
  );
}
