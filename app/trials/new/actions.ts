"use server";
import { redirect } from "next/navigation";
import { revalidatePath } from "next/cache";
import { mayCreateTrial, requireUser } from "@/lib/auth";
import { HttpError } from "@/lib/http";
import { newTrialSchema, type NewTrialFormState } from "@/lib/design/trial-schema";
import { createTrial } from "@/lib/design/service";

/** Creates a trial from the "New trial" form; re-checks the session and the right to create inside. */
export async function createTrialAction(_prev: NewTrialFormState, form: FormData): Promise<NewTrialFormState> {
  const values = Object.fromEntries([...form.entries()].filter(([, v]) => typeof v === "string")) as Record<string, string>;
  let user;
  try {
    user = await requireUser();
    if (!(await mayCreateTrial(user))) throw new HttpError(403, "Only an administrator or an unblinded statistician may create a trial.");
  } catch (e) {
    if (e instanceof HttpError) return { error: e.message, values };
    throw e;
  }
  const parsed = newTrialSchema.safeParse(values);
  if (!parsed.success) return { error: "Check the highlighted fields.", fieldErrors: parsed.error.flatten().fieldErrors, values };
  const result = await createTrial(user, parsed.data);
  if (!result.ok) return { error: "Check the highlighted fields.", fieldErrors: result.fieldErrors, values };
  revalidatePath("/trials");
  redirect(`/trials/${result.trialId}/design`);
}
