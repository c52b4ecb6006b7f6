/**
 * Applied migrations are never edited: a database migrated with one text of a migration and a
 * checkout holding another would have a schema no file describes. The SHA-256 of each migration's
 * file is recorded when it is applied and compared on every later migrate; a difference stops the
 * migrate with the migration's name (write a new migration instead).
 */
import { createHash } from "node:crypto";
import { readFileSync } from "node:fs";
import path from "node:path";
import type { Knex } from "knex";

export const CHECKSUM_TABLE = "knex_migrations_checksums";

const MIGRATIONS_DIR = path.resolve(import.meta.dirname, "migrations");

export function migrationFileText(name: string): string {
  return readFileSync(path.join(MIGRATIONS_DIR, `${name}.ts`), "utf8");
}

export function sha256(text: string): string {
  return createHash("sha256").update(text, "utf8").digest("hex");
}

export class EditedMigrationError extends Error {
  constructor(public readonly names: string[]) {
    super(`Applied migration(s) edited after they were applied: ${names.join(", ")}. Restore the file(s) and write a new migration for the change.`);
    this.name = "EditedMigrationError";
  }
}

/** Records the checksum of every newly applied migration and refuses when an applied one's file changed. */
export async function recordAndVerifyChecksums(knex: Knex, readText: (name: string) => string = migrationFileText): Promise<{ recorded: number; verified: number }> {
  if (!(await knex.schema.hasTable(CHECKSUM_TABLE))) {
    await knex.schema.createTable(CHECKSUM_TABLE, (t) => {
      t.string("name", 255).primary();
      t.specificType("sha256", "CHAR(64)").notNullable();
      t.dateTime("recorded_at", { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    });
  }
  const applied = (await knex("knex_migrations").select("name")).map((r: { name: string }) => r.name);
  // A rolled-back migration may be rewritten before it is applied again.
  await knex(CHECKSUM_TABLE).whereNotIn("name", applied.length ? applied : [""]).delete();
  const stored = new Map((await knex(CHECKSUM_TABLE).select("name", "sha256")).map((r: { name: string; sha256: string }) => [r.name, r.sha256]));
  const edited: string[] = [];
  const fresh: { name: string; sha256: string }[] = [];
  for (const name of applied) {
    const now = sha256(readText(name));
    const then = stored.get(name);
    if (then === undefined) fresh.push({ name, sha256: now });
    else if (then !== now) edited.push(name);
  }
  if (edited.length) throw new EditedMigrationError(edited);
  if (fresh.length) await knex(CHECKSUM_TABLE).insert(fresh);
  return { recorded: fresh.length, verified: applied.length - fresh.length };
}
