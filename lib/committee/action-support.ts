import "server-only";
/**
 * What the committee's server actions share: the trial check (a server action is a public POST
 * endpoint, so each re-checks the session and the role inside), the form read, and one mapping of
 * errors to form state (lib/form-action.ts).
 */
import { requireTrialAccess, type Capability, type TrialAccess } from "@/lib/auth";
import { formError } from "@/lib/form-action";
import type { CommitteeFormState } from "./schemas";

/** The form's fields as a plain object; `many` names fields that may repeat (checkbox lists). */
export function formFields(form: FormData, many: string[] = []): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  for (const key of new Set(form.keys())) out[key] = many.includes(key) ? form.getAll(key) : form.get(key);
  for (const key of many) out[key] ??= [];
  return out;
}

/**
 * Runs an act for the trial named in the form: refused (with lib/auth's words) without the
 * capability or the extra `also` check, else the act's outcome, or its error as form state.
 */
export async function committeeAct(
  form: FormData,
  cap: Capability,
  act: (access: TrialAccess) => Promise<string>,
  also?: (access: TrialAccess) => void,
): Promise<CommitteeFormState> {
  try {
    const access = await requireTrialAccess(Number(form.get("trialId")), cap);
    also?.(access);
    return { ok: await act(access) };
  } catch (e) {
    return formError(e);
  }
}
