import { NextResponse } from "next/server";
import { z } from "zod";
import { closedConnection, requireTrialAccess } from "@/lib/auth";
import { handle } from "@/lib/http";
import { loadReviewInput } from "@/lib/review/load-review";
import { whatIf, type WhatIfQuery } from "@/lib/review/what-if";
import { lookIds, type LookRouteParams } from "@/lib/route-params";

export const dynamic = "force-dynamic";

/** A count typed by the reviewer: a whole number, 0 or more (the upper limits need the design: lib/review/what-if.ts). */
const count = (name: string) =>
  z
    .string({ message: `${name} is missing.` })
    .trim()
    .min(1, `${name} is missing.`)
    .refine((s) => /^-?\d+(\.\d*)?$|^-?\.\d+$/.test(s), `${name} must be a number.`)
    .transform(Number)
    .refine(Number.isInteger, `${name} must be a whole number.`)
    .refine((v) => v >= 0, `${name} cannot be negative.`)
    .refine((v) => v <= 100_000, `${name} is far above any trial's size.`);

const singleSchema = z.object({ patients: count("patients"), responders: count("responders") });
const twoSchema = z.object({ patientsT: count("patientsT"), respondersT: count("respondersT"), patientsC: count("patientsC"), respondersC: count("respondersC") });

/**
 * CLOSED, read-only: the rule's answer at hypothetical counts after the look under review
 * (single arm: patients, responders; two arms: patientsT, respondersT, patientsC, respondersC).
 * Nothing is written, not even an audit row: a question about data that do not exist is not a record.
 */
export const GET = handle(async (req: Request, ctx: LookRouteParams) => {
  const { trialId, analysisId } = await lookIds(ctx);
  const access = await requireTrialAccess(trialId, "viewClosed");
  const sp = new URL(req.url).searchParams;
  const raw = (k: string) => sp.get(k) ?? undefined;
  const { input } = await loadReviewInput(access.trial, analysisId, closedConnection(access));
  // The design says which counts to ask for; parameters of the other kind are ignored.
  const q: WhatIfQuery =
    input.design.arms === "two"
      ? { arms: "two", ...twoSchema.parse({ patientsT: raw("patientsT"), respondersT: raw("respondersT"), patientsC: raw("patientsC"), respondersC: raw("respondersC") }) }
      : { arms: "single", ...singleSchema.parse({ patients: raw("patients"), responders: raw("responders") }) };
  return NextResponse.json(whatIf(input, q), { headers: { "Cache-Control": "no-store" } });
});
