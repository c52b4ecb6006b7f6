"use client";
/**
 * Calibration: search (thetaT, thetaL[, thetaU]) for designs meeting a type I error limit and a
 * power target with the smallest expected sample size under p0. The search runs on the server as
 * a job (POST .../calibrations); this panel polls its progress, can cancel it, and lists the best
 * designs; "Use this design" copies the thresholds into the form.
 */
import { useEffect, useRef, useState } from "react";
import { Button } from "@/components/ui/button";
import { Banner } from "@/components/ui/banner";
import { Field, TextInput } from "@/components/ui/field";
import { formatProbability } from "@/lib/format";
import { issuesToFieldErrors, num } from "@/lib/design/form-model";
import type { CalibrationJobJson } from "@/lib/jobs/calibration-job-json";
import type { CalibratedDesign } from "@/lib/stats/calibration";
import type { Design } from "@/lib/stats/types";

type RangeText = { from: string; to: string; step: string };
const POLL_MS = 500;

function RangeInputs({ id, label, value, onChange, errors }: { id: string; label: string; value: RangeText; onChange: (v: RangeText) => void; errors: Record<string, string> }) {
  return (
    <fieldset className="grid grid-cols-3 gap-2">
      <legend className="col-span-3 text-sm font-medium text-stone-700">{label}</legend>
      {(["from", "to", "step"] as const).map((k) => (
        <Field key={k} label={`${label}: ${k}`} name={`${id}-${k}`} error={errors[`${id}.${k}`]}>
          <TextInput id={`${id}-${k}`} name={`${id}-${k}`} inputMode="decimal" value={value[k]} onChange={(e) => onChange({ ...value, [k]: e.target.value })} autoComplete="off" />
        </Field>
      ))}
    </fieldset>
  );
}

export function CalibrationPanel({ trialId, design, onUse }: { trialId: number; design: Design | null; onUse: (d: CalibratedDesign) => void }) {
  const [limit, setLimit] = useState("0.1");
  const [target, setTarget] = useState("0.8");
  const [thetaT, setThetaT] = useState<RangeText>({ from: "0.8", to: "0.99", step: "0.01" });
  const [thetaL, setThetaL] = useState<RangeText>({ from: "0", to: "0.2", step: "0.01" });
  const [thetaU, setThetaU] = useState<RangeText>({ from: "0.95", to: "0.999", step: "0.01" });
  const [job, setJob] = useState<CalibrationJobJson | null>(null);
  const [error, setError] = useState<string | null>(null);
  const [errors, setErrors] = useState<Record<string, string>>({});
  const timer = useRef<ReturnType<typeof setTimeout> | null>(null);

  useEffect(() => () => { if (timer.current) clearTimeout(timer.current); }, []);

  if (!design) return <p className="text-sm text-stone-600">Calibration needs a valid design: fix the highlighted fields first.</p>;
  if (design.arms !== "single")
    return <p className="text-sm text-stone-600">Calibration searches single-arm designs. For two arms, adjust the thresholds and read the live operating characteristics.</p>;

  const running = job?.status === "running" || job?.status === "cancelling";
  const range = (r: RangeText) => ({ from: num(r.from), to: num(r.to), step: num(r.step) });

  async function poll(id: string) {
    try {
      const res = await fetch(`/api/trials/${trialId}/calibrations/${id}`);
      const body = await res.json();
      if (!res.ok) throw new Error(body.error ?? `The server answered ${res.status}.`);
      setJob(body.job);
      if (body.job.status === "running" || body.job.status === "cancelling") timer.current = setTimeout(() => poll(id), POLL_MS);
    } catch (e) {
      setError((e as Error).message);
    }
  }

  async function start() {
    setError(null);
    setErrors({});
    const res = await fetch(`/api/trials/${trialId}/calibrations`, {
      method: "POST",
      headers: { "content-type": "application/json" },
      body: JSON.stringify({ spec: design, typeIErrorLimit: num(limit), powerTarget: num(target), thetaT: range(thetaT), thetaL: range(thetaL), thetaU: design?.arms === "single" && design.rule.efficacyStopping ? range(thetaU) : null, keep: 10 }),
    });
    const body = await res.json().catch(() => ({}));
    if (!res.ok) {
      setError(body.error ?? `The server answered ${res.status}.`);
      if (Array.isArray(body.issues)) {
        const e: Record<string, string> = {};
        for (const i of body.issues as { path: string; message: string }[]) if (!(i.path in e)) e[i.path] = i.message;
        setErrors({ ...e, ...issuesToFieldErrors(body.issues.filter((i: { path: string }) => i.path.startsWith("spec.")).map((i: { path: string; message: string }) => ({ ...i, path: i.path.slice(5) }))) });
      }
      return;
    }
    setJob(body.job);
    timer.current = setTimeout(() => poll(body.job.id), POLL_MS);
  }

  async function cancel() {
    if (!job) return;
    const res = await fetch(`/api/trials/${trialId}/calibrations/${job.id}`, { method: "DELETE" });
    const body = await res.json().catch(() => ({}));
    if (res.ok) setJob(body.job);
    else setError(body.error ?? "The calibration could not be cancelled.");
  }

  return (
    <div className="flex flex-col gap-3" aria-label="Calibration">
      <p className="text-xs text-stone-600">
        Keeps the prior, rates, looks and rule kind of the form, and searches the thresholds for the designs with type I error at most the limit and power at least the target, smallest expected sample size under p0 first.
      </p>
      <div className="grid grid-cols-2 gap-3">
        <Field label="Type I error limit" name="cal-limit" error={errors.typeIErrorLimit}>
          <TextInput id="cal-limit" name="cal-limit" inputMode="decimal" value={limit} onChange={(e) => setLimit(e.target.value)} />
        </Field>
        <Field label="Power target" name="cal-target" error={errors.powerTarget}>
          <TextInput id="cal-target" name="cal-target" inputMode="decimal" value={target} onChange={(e) => setTarget(e.target.value)} />
        </Field>
      </div>
      <RangeInputs id="thetaT" label="θT grid" value={thetaT} onChange={setThetaT} errors={errors} />
      <RangeInputs id="thetaL" label={design.rule.kind === "predictive" ? "θL grid" : "pL grid"} value={thetaL} onChange={setThetaL} errors={errors} />
      {design.rule.efficacyStopping ? <RangeInputs id="thetaU" label={design.rule.kind === "predictive" ? "θU grid" : "pU grid"} value={thetaU} onChange={setThetaU} errors={errors} /> : null}
      <div className="flex gap-2">
        <Button type="button" onClick={start} disabled={running}>Run calibration</Button>
        {running ? <Button type="button" variant="secondary" onClick={cancel} disabled={job?.status === "cancelling"}>Cancel</Button> : null}
      </div>
      {error ? <Banner tone="danger">{error}</Banner> : null}
      {job ? (
        <div className="flex flex-col gap-2">
          <label htmlFor="cal-progress" className="text-sm">
            {job.status === "running" ? "Searching…" : job.status === "cancelling" ? "Cancelling…" : job.status === "cancelled" ? "Cancelled: results so far." : job.status === "failed" ? "The search failed." : "Search complete."}{" "}
            <span className="tabular-nums text-stone-600">{Math.round(job.progress * 100)}% · {job.evaluated} of {job.total} designs evaluated · {job.feasible} meet both targets</span>
          </label>
          <progress id="cal-progress" max={1} value={job.progress} className="h-2 w-full accent-lichen-600" data-testid="calibration-progress" />
          {job.error ? <Banner tone="danger">{job.error}</Banner> : null}
          {job.status !== "running" && job.best.length === 0 ? <p className="text-sm text-stone-600">No design on this grid meets both targets. Widen the grid, raise the sample size, or relax a target.</p> : null}
          {job.best.length > 0 ? (
            <table className="w-full text-sm" aria-label="Best designs found">
              <thead>
                <tr className="text-left text-xs text-stone-600">
                  <th className="py-1">θT</th>
                  <th>{design.rule.kind === "predictive" ? "θL" : "pL"}</th>
                  {design.rule.efficacyStopping ? <th>{design.rule.kind === "predictive" ? "θU" : "pU"}</th> : null}
                  <th>Type I error</th>
                  <th>Power</th>
                  <th>E(N) at p0</th>
                  <th title="Probability of stopping early for futility, under p0">Early futility stop at p0</th>
                  <th title="Probability of stopping early for efficacy, under p0">Early efficacy stop at p0</th>
                  <th />
                </tr>
              </thead>
              <tbody>
                {job.best.map((b, i) => (
                  <tr key={i} className="border-t border-stone-100 tabular-nums" data-testid="calibration-result">
                    <td className="py-1">{b.thetaT}</td>
                    <td>{b.thetaL}</td>
                    {design.rule.efficacyStopping ? <td>{b.thetaU ?? "—"}</td> : null}
                    <td>{formatProbability(b.typeIError)}</td>
                    <td>{formatProbability(b.power)}</td>
                    <td>{b.expectedSampleSizeNull.toFixed(1)}</td>
                    {/* Jobs stored before the split carry only the total; show a dash rather than a guess. */}
                    <td>{typeof b.pEarlyFutilityNull === "number" ? formatProbability(b.pEarlyFutilityNull) : "—"}</td>
                    <td>{typeof b.pEarlyEfficacyNull === "number" ? formatProbability(b.pEarlyEfficacyNull) : "—"}</td>
                    <td>
                      <Button type="button" variant="quiet" onClick={() => onUse(b)} aria-label={`Use this design: θT ${b.thetaT}, futility ${b.thetaL}`}>
                        Use this design
                      </Button>
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
          ) : null}
        </div>
      ) : null}
    </div>
  );
}
