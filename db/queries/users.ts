import "server-only";
import { db, type Tx } from "../knex";
import type { PublicUser, UserRow } from "../types";

export function toPublicUser(r: UserRow): PublicUser {
  return { id: r.id, email: r.email, name: r.name, isAdmin: Boolean(r.is_admin), isActive: Boolean(r.is_active) };
}

export async function fetchUserByEmail(email: string, tx: Tx = db): Promise<UserRow | undefined> {
  return tx<UserRow>("users").where({ email: email.toLowerCase() }).first();
}

export async function fetchUserById(id: number, tx: Tx = db): Promise<UserRow | undefined> {
  return tx<UserRow>("users").where({ id }).first();
}

/** The row locked for the rest of the transaction (a password or status change). */
export async function fetchUserForUpdate(tx: Tx, id: number): Promise<UserRow | undefined> {
  return tx<UserRow>("users").where({ id }).forUpdate().first();
}

export async function fetchUsers(tx: Tx = db): Promise<PublicUser[]> {
  const rows = await tx<UserRow>("users").orderBy("name");
  return rows.map(toPublicUser);
}

export async function insertUser(
  tx: Tx,
  u: { email: string; name: string; passwordHash: string; isAdmin: boolean },
): Promise<number> {
  const [id] = await tx("users").insert({
    email: u.email.toLowerCase(),
    name: u.name,
    password_hash: u.passwordHash,
    is_admin: u.isAdmin,
  });
  return id;
}

/** A new password ends every session of the account (the session version moves on). */
export async function updateUserPassword(tx: Tx, id: number, passwordHash: string): Promise<void> {
  await tx("users")
    .where({ id })
    .update({ password_hash: passwordHash, session_version: tx.raw("session_version + 1"), updated_at: new Date() });
}

/** Ends every session of the account now (sign-out). */
export async function bumpSessionVersion(tx: Tx, id: number): Promise<void> {
  await tx("users").where({ id }).update({ session_version: tx.raw("session_version + 1") });
}

/** Deactivation also ends every session at once; accounts are never deleted. */
export async function updateUserActive(tx: Tx, id: number, active: boolean): Promise<number> {
  return tx("users")
    .where({ id, is_active: !active })
    .update({ is_active: active, session_version: tx.raw("session_version + 1"), updated_at: new Date() });
}

export async function countActiveAdmins(tx: Tx = db): Promise<number> {
  const row = await tx("users").where({ is_admin: true, is_active: true }).count({ n: "*" }).first();
  return Number(row?.n ?? 0);
}
