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
