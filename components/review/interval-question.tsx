"use client";
/**
 * "How likely is the response rate between A and B?" The answer comes from the closed interval
 * route handler as the reviewer types (debounced, earlier requests cancelled), and the asked
 * interval is shaded on the posterior density. No page reload.
 */
import { callApi } from "@/lib/api-client";
import { useEffect, useRef, useState } from "react";
import { Field, SelectInput, TextInput } from "@/components/ui/field";
import { formatProbability, formatRate } from "@/lib/format";
import type { Review } from "@/lib/review/compute-review";
import { CumulativePlot, PosteriorDensityPlot } from "./review-charts";

type Answer = { state: "idle" | "loading" } | { state: "answer"; probability: number; lo: number; hi: number; armId: number } | { state: "error"; message: string };

export function IntervalQuestion({ trialId, analysisId, review, defaultLo, defaultHi }: { trialId: number; analysisId: number; review: Pick<Review, "arms" | "reference" | "credibleLevel">; defaultLo: number; defaultHi: number }) {
  const [armId, setArmId] = useState(review.arms[0].armId);
  const [lo, setLo] = useState(String(defaultLo));
  const [hi, setHi] = useState(String(defaultHi));
  const [answer, setAnswer] = useState<Answer>({ state: "idle" });
  const controller = useRef<AbortController | null>(null);

  const loNum = Number(lo);
  const hiNum = Number(hi);
  const localError =
    lo.trim() === "" || hi.trim() === "" || !Number.isFinite(loNum) || !Number.isFinite(hiNum)
      ? "Enter two numbers between 0 and 1."
      : loNum < 0 || hiNum > 1 || loNum > 1 || hiNum < 0
        ? "Both ends must lie between 0 and 1."
        : loNum >= hiNum
          ? "The lower end must be below the upper end."
          : null;

  useEffect(() => {
    if (localError) return;
    const timer = setTimeout(async () => {
      controller.current?.abort();
      const c = new AbortController();
      controller.current = c;
      setAnswer({ state: "loading" });
      try {
        const r = await callApi<{ probability: number; lo: number; hi: number; arm: number }>(`/api/trials/${trialId}/analyses/${analysisId}/interval?arm=${armId}&lo=${loNum}&hi=${hiNum}`, { signal: c.signal, cache: "no-store" });
        if (!r.ok) setAnswer({ state: "error", message: r.pathIssues[0]?.message ?? r.error });
        else setAnswer({ state: "answer", probability: r.data.probability, lo: r.data.lo, hi: r.data.hi, armId: r.data.arm });
      } catch (e) {
        if ((e as Error).name !== "AbortError") setAnswer({ state: "error", message: "The server could not be reached; try again." });
      }
    }, 250);
    return () => clearTimeout(timer);
  }, [armId, loNum, hiNum, localError, trialId, analysisId]);

  const arm = review.arms.find((a) => a.armId === armId)!;
  const band = answer.state === "answer" ? { armId: answer.armId, lower: answer.lo, upper: answer.hi } : null;
  const message = localError ?? (answer.state === "error" ? answer.message : null);
  return (
    <div className="flex flex-col gap-3">
      <div className="grid gap-3 sm:grid-cols-3">
        {review.arms.length > 1 ? (
          <Field label="Arm" name="interval-arm">
            <SelectInput id="interval-arm" name="interval-arm" value={armId} onChange={(e) => setArmId(Number(e.target.value))}>
              {review.arms.map((a) => (
                <option key={a.armId} value={a.armId}>
                  {a.label}
                </option>
              ))}
            </SelectInput>
          </Field>
        ) : null}
        <Field label="From (rate between 0 and 1)" name="interval-lo">
          <TextInput id="interval-lo" name="interval-lo" inputMode="decimal" value={lo} onChange={(e) => setLo(e.target.value)} invalid={!!localError} />
        </Field>
        <Field label="To (rate between 0 and 1)" name="interval-hi">
          <TextInput id="interval-hi" name="interval-hi" inputMode="decimal" value={hi} onChange={(e) => setHi(e.target.value)} invalid={!!localError} />
        </Field>
      </div>
      <p aria-live="polite" data-testid="interval-answer" className="text-base">
        {message ? (
          <span className="text-berry-700">{message}</span>
        ) : answer.state === "answer" ? (
          <>
            P({formatRate(answer.lo)} &lt; response rate ≤ {formatRate(answer.hi)}) for {arm.label} ={" "}
            <strong className="tabular-nums" data-testid="interval-probability">
              {formatProbability(answer.probability)}
            </strong>
          </>
        ) : (
          <span className="text-stone-500">Working…</span>
        )}
      </p>
      <PosteriorDensityPlot review={review} band={band} />
      <CumulativePlot review={review} band={band} />
    </div>
  );
}
