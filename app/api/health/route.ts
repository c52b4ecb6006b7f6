import { NextResponse } from "next/server";
import { db } from "@/db/knex";
import pkg from "@/package.json";
import { ENGINE_VERSION } from "@/lib/stats/version";

export const dynamic = "force-dynamic";

/** Public liveness check: the app version, the engine version, and whether the database answers. */
export async function GET() {
  let database: "ok" | "unreachable" = "ok";
  try {
    await db.raw("SELECT 1");
  } catch {
    database = "unreachable";
  }
  return NextResponse.json(
    { status: database === "ok" ? "ok" : "degraded", version: pkg.version, engineVersion: ENGINE_VERSION, database },
    { status: database === "ok" ? 200 : 503 },
  );
}
