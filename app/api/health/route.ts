import { NextResponse } from "next/server";
import { pingDatabase } from "@/db/queries/health";
import pkg from "@/package.json";
import { ENGINE_VERSION } from "@/lib/stats/version";

export const dynamic = "force-dynamic";

/** Public liveness check: the app version, the engine version, and whether the database answers. */
export async function GET() {
  const database = (await pingDatabase()) ? "ok" : "unreachable";
  return NextResponse.json(
    { status: database === "ok" ? "ok" : "degraded", version: pkg.version, engineVersion: ENGINE_VERSION, database },
    { status: database === "ok" ? 200 : 503 },
  );
}
