/**
 * Applied migrations are never edited: the migrate step records each applied migration's SHA-256 and
 * refuses, naming the migration, when a file no longer matches what was applied.
 */
import { execFile } from "node:child_process";
import { promisify } from "node:util";
import path from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { CHECKSUM_TABLE, EditedMigrationError, migrationFileText, recordAndVerifyChecksums, sha256 } from "@/db/migration-checksums";
import { migrationNames } from "@/db/migrations";
import { ownerKnex } from "./support/db";

const owner = ownerKnex();
afterAll(() => owner.destroy());
const ROOT = path.resolve(import.meta.dirname, "../..");

describe("checksums of applied migrations", () => {
  it("holds the SHA-256 of every applied migration's file (node:crypto of the file text)", async () => {
    await recordAndVerifyChecksums(owner);
    const rows: { name: string; sha256: string }[] = await owner(CHECKSUM_TABLE).select("name", "sha256").orderBy("name");
    expect(rows.map((r) => r.name)).toEqual([...migrationNames].sort());
    for (const r of rows) expect(r.sha256, r.name).toBe(sha256(migrationFileText(r.name)));
  });

  it("refuses when an applied migration's text differs, naming it, and changes nothing", async () => {
    const victim = migrationNames[3];
    const before = await owner(CHECKSUM_TABLE).select("name", "sha256").orderBy("name");
    const edited = (name: string) => (name === victim ? `${migrationFileText(name)}\n// edited after it was applied\n` : migrationFileText(name));
    const attempt = recordAndVerifyChecksums(owner, edited);
    await expect(attempt).rejects.toBeInstanceOf(EditedMigrationError);
    await expect(recordAndVerifyChecksums(owner, edited)).rejects.toThrow(victim);
    expect(await owner(CHECKSUM_TABLE).select("name", "sha256").orderBy("name")).toEqual(before);
    await expect(recordAndVerifyChecksums(owner)).resolves.toEqual({ recorded: 0, verified: migrationNames.length });
  });

  it("the migrate script exits non-zero and names the migration when a stored checksum disagrees", async () => {
    const victim = migrationNames[0];
    const [{ sha256: kept }] = await owner(CHECKSUM_TABLE).where({ name: victim }).select("sha256");
    await owner(CHECKSUM_TABLE).where({ name: victim }).update({ sha256: "0".repeat(64) });
    try {
      const run = promisify(execFile)("npx", ["tsx", "scripts/migrate.ts"], { cwd: ROOT, env: { ...process.env, CAIRN_DB_AS_OWNER: "1" } });
      const failure = await run.then(() => null, (e: { code: number; stderr: string }) => e);
      expect(failure?.code).toBe(1);
      expect(failure?.stderr).toContain(victim);
    } finally {
      await owner(CHECKSUM_TABLE).where({ name: victim }).update({ sha256: kept });
    }
  });
});
