import "server-only";
/**
 * Leases that pick one process for a scheduled duty (the mail scheduler). Operational state like
 * sign_in_failures: no trial record, so no audit row; what the duty does is audited by the duty.
 */
import { db, writeTransaction, type Tx } from "../knex";

type Lease = { name: string; holder: string; expires_at: Date; renewed_at: Date };

/**
 * Takes or renews the lease `name` for `holder` until `until`, if nobody else holds it beyond `now`.
 * The row is read FOR UPDATE inside one transaction, so of two processes asking at once exactly one
 * gets it. Returns whether `holder` holds the lease afterwards.
 */
export async function claimLease(name: string, holder: string, now: Date, until: Date): Promise<boolean> {
  // The row exists from the first claim on. Created in its own statement, outside the locking
  // transaction: an INSERT IGNORE and a FOR UPDATE read in one transaction deadlock under a race.
  await db.raw("INSERT IGNORE INTO scheduler_leases (name, holder, expires_at, renewed_at) VALUES (?, ?, ?, ?)", [name, "", new Date(0), new Date(0)]);
  try {
    return await writeTransaction(async (tx) => {
      const row = (await tx("scheduler_leases").where({ name }).forUpdate().first()) as Lease | undefined;
      if (!row) return false;
      const free = row.holder === holder || new Date(row.expires_at).getTime() <= now.getTime();
      if (!free) return false;
      await tx("scheduler_leases").where({ name }).update({ holder, expires_at: until, renewed_at: now });
      return true;
    });
  } catch (e) {
    // A claimant that loses a lock race simply does not hold the lease this round.
    if ((e as { code?: string }).code === "ER_LOCK_DEADLOCK" || (e as { code?: string }).code === "ER_LOCK_WAIT_TIMEOUT") return false;
    throw e;
  }
}

/** Gives the lease up at once (a process shutting down), so another takes over without waiting. */
export async function releaseLease(name: string, holder: string, tx: Tx = db): Promise<void> {
  await tx("scheduler_leases").where({ name, holder }).update({ expires_at: new Date(0) });
}

export async function fetchLease(name: string, tx: Tx = db): Promise<Lease | undefined> {
  return tx("scheduler_leases").where({ name }).first();
}
