/**
 * Backups: scripts/backup dumps the test database, scripts/restore loads it into a brand-new MariaDB
 * instance; the restored copy has the same row counts and its audit chain still verifies.
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { execFileSync } from "node:child_process";
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import knexFactory, { type Knex } from "knex";
import { db, resetDatabase } from "./support/db";
import { seedDemo } from "@/db/seeds/demo";
import { verifyAuditChain } from "@/db/audit";
import { freePort } from "./support/free-port";

const dir = mkdtempSync(path.join(tmpdir(), "cairn-restore-"));
const port = await freePort();
const sock = path.join(dir, "mariadb.sock");
const dump = path.join(dir, "backup.sql.gz");
let restored: Knex;

const TABLES = ["users", "trials", "arms", "trial_memberships", "designs", "analyses", "analysis_arm_counts", "signatures", "recommendations", "audit_events", "audit_chain_head"];

async function counts(k: Knex) {
  const out: Record<string, number> = {};
  for (const t of TABLES) out[t] = Number((await k(t).count({ n: "*" }).first())?.n);
  return out;
}

beforeAll(async () => {
  await resetDatabase();
  await seedDemo();
  execFileSync("bash", ["scripts/backup", process.env.CAIRN_DB_NAME!, dump], { stdio: "pipe" });
  execFileSync("bash", ["scripts/restore", dump, "--fresh-instance", dir, String(port), "--database", "cairn_restored"], { stdio: "pipe" });
  execFileSync("mariadb", ["--no-defaults", `--socket=${sock}`, "-uroot", "-e", "CREATE USER IF NOT EXISTS 'verify'@'127.0.0.1' IDENTIFIED BY 'verify-pass'; GRANT SELECT, TRIGGER ON cairn_restored.* TO 'verify'@'127.0.0.1';"], { env: { ...process.env, PATH: `${process.env.PATH}:/usr/sbin` } });
  restored = knexFactory({ client: "mysql2", connection: { host: "127.0.0.1", port, user: "verify", password: "verify-pass", database: "cairn_restored", timezone: "Z" } });
}, 120_000);

afterAll(async () => {
  await restored?.destroy();
  try {
    execFileSync("mariadb-admin", ["--no-defaults", `--socket=${sock}`, "-uroot", "shutdown"], { env: { ...process.env, PATH: `${process.env.PATH}:/usr/sbin` } });
  } catch {
    /* already stopped */
  }
  rmSync(dir, { recursive: true, force: true });
  await resetDatabase();
});

describe("backup and restore", () => {
  it("the restored copy has the same row count in every table", async () => {
    expect(await counts(restored)).toEqual(await counts(db));
    expect((await counts(restored)).audit_events).toBeGreaterThan(10);
  });

  it("the restored audit chain verifies end to end", async () => {
    const original = await verifyAuditChain(db);
    const copy = await verifyAuditChain(restored);
    expect(copy).toEqual(original);
    expect(copy.ok).toBe(true);
  });

  it("the restored copy still refuses changes to the audit trail, signatures, recommendations and approved minutes (triggers came along)", async () => {
    const [rows] = await restored.raw("SELECT trigger_name AS t FROM information_schema.triggers WHERE trigger_schema = 'cairn_restored' ORDER BY 1");
    expect((rows as { t: string }[]).map((r) => r.t)).toEqual([
      "audit_events_refuse_delete",
      "audit_events_refuse_update",
      "meeting_minutes_refuse_approved_delete",
      "meeting_minutes_refuse_approved_update",
      "recommendations_refuse_delete",
      "recommendations_refuse_update",
      "signatures_refuse_delete",
      "signatures_refuse_update",
    ]);
  });
});
