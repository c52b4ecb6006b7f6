import "server-only";
/** Failed sign-in attempts within the throttling window (lib/auth/rate-limit.ts has the rules). */
import { db, writeTransaction } from "../knex";

/** "pair" is one account from one address; "account" rows are no longer written (kept for old rows). */
type SignInScope = "account" | "address" | "pair";
type SignInSubject = { scope: SignInScope; subject: string };

/** Times (ms) of the failures after `since` for each of the given subjects, oldest first. */
export async function fetchSignInFailureTimes(subjects: SignInSubject[], since: Date): Promise<Record<SignInScope, number[]>> {
  const out: Record<SignInScope, number[]> = { account: [], address: [], pair: [] };
  if (!subjects.length) return out;
  const rows = (await db("sign_in_failures")
    .where("failed_at", ">", since)
    .andWhere((q) => {
      for (const s of subjects) q.orWhere({ scope: s.scope, subject: s.subject });
    })
    .orderBy("failed_at")
    .select("scope", "failed_at")) as { scope: SignInScope; failed_at: Date }[];
  for (const r of rows) out[r.scope].push(new Date(r.failed_at).getTime());
  return out;
}

/** Records one failure for each subject and forgets failures older than `forgetBefore`. */
export async function insertSignInFailures(subjects: SignInSubject[], at: Date, forgetBefore: Date): Promise<void> {
  await writeTransaction(async (tx) => {
    await tx("sign_in_failures").insert(subjects.map((s) => ({ scope: s.scope, subject: s.subject, failed_at: at })));
    await tx("sign_in_failures").where("failed_at", "<", forgetBefore).del();
  });
}

export async function deleteSignInFailures(scope: SignInScope, subject: string): Promise<void> {
  await db("sign_in_failures").where({ scope, subject }).del();
}
