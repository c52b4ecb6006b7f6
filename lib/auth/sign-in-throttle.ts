import "server-only";
/** Sign-in throttling against the shared record of failures (rules in ./rate-limit.ts). */
import { deleteSignInFailures, fetchSignInFailureTimes, insertSignInFailures } from "@/db/queries/sign-in-failures";
import { blockedForMs, SIGN_IN_LIMITS } from "./rate-limit";

const LONGEST_WINDOW_MS = Math.max(SIGN_IN_LIMITS.perAccount.windowMs, SIGN_IN_LIMITS.perAddress.windowMs);
const subjects = (account: string, address: string) => [
  { scope: "account" as const, subject: account },
  { scope: "address" as const, subject: address },
];

/** Milliseconds this account, from this address, must wait before trying again (0: try now). */
export async function signInWaitMs(account: string, address: string, now = Date.now()): Promise<number> {
  const times = await fetchSignInFailureTimes(subjects(account, address), new Date(now - LONGEST_WINDOW_MS));
  return Math.max(blockedForMs(times.account, SIGN_IN_LIMITS.perAccount, now), blockedForMs(times.address, SIGN_IN_LIMITS.perAddress, now));
}

export async function recordSignInFailure(account: string, address: string, now = Date.now()): Promise<void> {
  await insertSignInFailures(subjects(account, address), new Date(now), new Date(now - LONGEST_WINDOW_MS));
}

/** A successful sign-in clears its account's count (not its address's: others may share it). */
export async function clearAccountFailures(account: string): Promise<void> {
  await deleteSignInFailures("account", account);
}
