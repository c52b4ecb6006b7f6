import "server-only";
/** Password throttling against the shared record of failures (rules in ./rate-limit.ts). */
import { deleteSignInFailures, fetchSignInFailureTimes, insertSignInFailures } from "@/db/queries/sign-in-failures";
import { backoffForMs, blockedForMs, SIGN_IN_LIMITS } from "./rate-limit";

const LONGEST_WINDOW_MS = Math.max(SIGN_IN_LIMITS.perPair.windowMs, SIGN_IN_LIMITS.perAddress.windowMs);

// A newline cannot occur in an e-mail address that passed validation, so the pair key is unambiguous.
const pairKey = (account: string, address: string) => `${account.toLowerCase()}\n${address}`.slice(0, 254);
const subjects = (account: string, address: string) => [
  { scope: "pair" as const, subject: pairKey(account, address) },
  { scope: "address" as const, subject: address },
];

/** Milliseconds this account, from this address, must wait before trying again (0: try now). */
export async function signInWaitMs(account: string, address: string, now = Date.now()): Promise<number> {
  const times = await fetchSignInFailureTimes(subjects(account, address), new Date(now - LONGEST_WINDOW_MS));
  return Math.max(backoffForMs(times.pair, SIGN_IN_LIMITS.perPair, now), blockedForMs(times.address, SIGN_IN_LIMITS.perAddress, now));
}

export async function recordSignInFailure(account: string, address: string, now = Date.now()): Promise<void> {
  await insertSignInFailures(subjects(account, address), new Date(now), new Date(now - LONGEST_WINDOW_MS));
}

/** A correct password clears its pair's count (not its address's: others may share it). */
export async function clearPairFailures(account: string, address: string): Promise<void> {
  await deleteSignInFailures("pair", pairKey(account, address));
}
