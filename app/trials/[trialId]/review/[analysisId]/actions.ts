"use server";
import { formId } from "@/lib/route-params";
import { revalidatePath } from "next/cache";
import { ZodError } from "zod";
import { requireTrialAccess } from "@/lib/auth";
import { HttpError } from "@/lib/http";
import { refusedField } from "@/lib/form-action";
import { recordRecommendation } from "@/lib/review/record-recommendation";
import type { RecommendationFormState } from "@/lib/review/recommendation-schema";


/**
 * Records the committee's recommendation with an e-signature. A server action is a public POST
 * endpoint: the session and role are checked here again, and every failure comes back as a
 * message (never outcome data; the rationale the member typed stays in their own form).
 */
export async function recordRecommendationAction(_prev: RecommendationFormState, form: FormData): Promise<RecommendationFormState> {
  const trialId = formId(form.get("trialId"));
  const analysisId = formId(form.get("analysisId"));
  try {
    const access = await requireTrialAccess(trialId, "recordRecommendation");
    const recorded = await recordRecommendation(access, analysisId, {
      decision: form.get("decision") ?? undefined,
      rationale: form.get("rationale") ?? undefined,
      correctsId: form.get("correctsId") ?? undefined,
      password: form.get("password") ?? undefined,
    });
    revalidatePath(`/trials/${trialId}`, "layout");
    return { ok: recorded.correctsId ? "Correction recorded and signed." : "Recommendation recorded and signed." };
  } catch (e) {
    if (e instanceof ZodError) {
      const fieldErrors: NonNullable<RecommendationFormState["fieldErrors"]> = {};
      for (const i of e.issues) {
        const k = i.path[0] as keyof typeof fieldErrors;
        (fieldErrors[k] ??= []).push(i.message);
      }
      return { error: "Check the highlighted fields; nothing was signed.", fieldErrors };
    }
    if (e instanceof HttpError) {
      if (refusedField(e) === "password") return { error: e.message, fieldErrors: { password: [e.message] } };
      return { error: e.message };
    }
    throw e;
  }
}
