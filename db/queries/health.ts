import "server-only";
import { db } from "../knex";

/** True when the database answers a trivial query. */
export async function pingDatabase(): Promise<boolean> {
  try {
    await db.raw("SELECT 1");
    return true;
  } catch {
    return false;
  }
}
