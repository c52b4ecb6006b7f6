/**
 * Blinding at the database: the blinded account (cairn_blind) is tried on every column of every
 * table and view that information_schema lists, and must be refused exactly where
 * db/classification.ts says the data is not open. A new table or text column fails here until it
 * is classified. Plus the static rules that make the closed connection hard to reach.
 */
import { beforeAll, describe, expect, it } from "vitest";
import { readFileSync, readdirSync, statSync } from "node:fs";
import path from "node:path";
import { appendAudit } from "@/db/audit";
import { blindDb } from "@/db/knex";
import { BLINDED_READS, FREE_TEXT } from "@/db/classification";
import { db, resetDatabase } from "./support/db";

const ROOT = path.resolve(__dirname, "../..");
const TEXT_TYPES = new Set(["varchar", "char", "text", "tinytext", "mediumtext", "longtext", "json", "blob", "tinyblob", "mediumblob", "longblob"]);

type Column = { table: string; column: string; dataType: string };
let columns: Column[] = [];
let tables: string[] = [];

beforeAll(async () => {
  await resetDatabase();
  const [rows] = await db.raw(
    "SELECT table_name AS t, column_name AS c, data_type AS d FROM information_schema.columns WHERE table_schema = DATABASE() ORDER BY table_name, ordinal_position",
  );
  columns = (rows as Array<{ t: string; c: string; d: string }>).map((r) => ({ table: r.t, column: r.c, dataType: r.d }));
  tables = [...new Set(columns.map((c) => c.table))];
});

const readable = (table: string, column: string): boolean => {
  const r = BLINDED_READS[table];
  return r === "all" || (Array.isArray(r) && r.includes(column));
};

async function blindCanSelect(table: string, column: string): Promise<boolean> {
  try {
    await blindDb.raw("SELECT ?? FROM ?? LIMIT 0", [column, table]);
    return true;
  } catch (e) {
    const code = (e as { code?: string }).code ?? "";
    if (["ER_COLUMNACCESS_DENIED_ERROR", "ER_TABLEACCESS_DENIED_ERROR", "ER_TABLEACCESS_DENIED", "ER_COLUMNACCESS_DENIED"].includes(code)) return false;
    throw e;
  }
}

describe("the blinded database account", () => {
  it("every table and view is classified in db/classification.ts (BLINDED_READS)", () => {
    expect(tables.length).toBeGreaterThan(15);
    expect(tables.filter((t) => BLINDED_READS[t] === undefined)).toEqual([]);
  });

  it("every text column of every table is classified open, closed or secret (FREE_TEXT)", () => {
    const unclassified = columns.filter((c) => TEXT_TYPES.has(c.dataType) && !c.table.endsWith("_open") && FREE_TEXT[`${c.table}.${c.column}`] === undefined);
    expect(unclassified.map((c) => `${c.table}.${c.column}`)).toEqual([]);
  });

  it("no closed or secret text column is readable by the blinded account (the two lists agree)", () => {
    const clash = Object.entries(FREE_TEXT)
      .filter(([, cls]) => cls !== "open")
      .map(([k]) => k.split(".") as [string, string])
      .filter(([t, c]) => readable(t, c));
    expect(clash).toEqual([]);
  });

  it("a blinded request's SELECT on every closed table and closed column is refused, and every open one is allowed", async () => {
    const wrong: string[] = [];
    for (const c of columns) {
      const allowed = await blindCanSelect(c.table, c.column);
      if (allowed !== readable(c.table, c.column)) wrong.push(`${c.table}.${c.column}: ${allowed ? "readable" : "refused"}`);
    }
    expect(wrong).toEqual([]);
    // The closed tables themselves, by name (a positive statement, not only agreement with the list).
    for (const [t, c] of [["analysis_arm_counts", "responders"], ["patient_outcomes", "responder"], ["recommendations", "rationale"], ["meetings", "closed_agenda"], ["audit_events", "new_values"], ["signatures", "record_hash"], ["packets", "pdf"], ["users", "password_hash"]])
      expect(await blindCanSelect(t, c), `${t}.${c}`).toBe(false);
  });

  it("SELECT * on a table with closed columns is refused as a whole", async () => {
    for (const t of ["meetings", "recommendations", "signatures", "analysis_arm_counts"]) await expect(blindDb(t).select("*").limit(1)).rejects.toThrow(/denied/i);
  });

  it("the view of the audit trail gives the blinded account open rows only, without hashes", async () => {
    await db.transaction((tx) => appendAudit(tx, { actorUserId: null, actorEmail: "t@test.example", trialId: null, action: "secret_counts", entityType: "test", entityId: 1, visibility: "closed", newValues: { responders: 7 } }));
    await db.transaction((tx) => appendAudit(tx, { actorUserId: null, actorEmail: "t@test.example", trialId: null, action: "open_note", entityType: "test", entityId: 2, visibility: "open", newValues: { note: "hello" } }));
    const rows = await blindDb("audit_events_open").select("*");
    expect(rows.map((r: { action: string }) => r.action)).toEqual(["open_note"]);
    expect(Object.keys(rows[0]).some((k) => k.includes("hash"))).toBe(false);
    await expect(blindDb("audit_events").select("id").limit(1)).rejects.toThrow(/denied/i);
  });
});

function sourceFiles(dir: string): string[] {
  const out: string[] = [];
  for (const name of readdirSync(dir)) {
    if (["node_modules", ".next", ".git", ".data", ".run"].includes(name) || name.startsWith(".next")) continue;
    const full = path.join(dir, name);
    if (statSync(full).isDirectory()) out.push(...sourceFiles(full));
    else if (/\.(ts|tsx|mjs)$/.test(name)) out.push(path.relative(ROOT, full));
  }
  return out;
}

describe("who can get a closed connection", () => {
  it("asClosedConnection is called only by lib/auth (for an unblinded access); the packet code takes the caller's connection", () => {
    const callers = ["app", "lib", "db", "components", "scripts"]
      .flatMap((d) => sourceFiles(path.join(ROOT, d)))
      .filter((f) => !f.endsWith(".test.ts") && /asClosedConnection\(/.test(readFileSync(path.join(ROOT, f), "utf8")));
    expect(callers.sort()).toEqual(["db/knex.ts", "lib/auth/index.ts"]);
  });

  it("no closed query in db/queries/closed.ts has a default connection (a caller must pass one)", () => {
    const src = readFileSync(path.join(ROOT, "db/queries/closed.ts"), "utf8");
    const reads = [...src.matchAll(/export async function (fetch\w+|count\w+)\(([^)]*)\)/g)];
    expect(reads.length).toBeGreaterThan(4);
    for (const [, name, params] of reads) {
      expect(params, name).toMatch(/: ClosedReader$/);
      expect(params, name).not.toMatch(/=\s*db/);
    }
  });
});
