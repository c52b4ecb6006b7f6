/**
 * Property-based bad input (fast-check) against every write route handler and server action, called
 * as a user who holds the right role: whatever the payload, the answer is a 4xx with a message or a
 * success, never a 5xx or a thrown error; and a refused payload writes nothing (every write in Cairn
 * appends exactly one audit row, so an unchanged audit count means nothing was written).
 */
import { beforeAll, describe, expect, it, vi } from "vitest";
import fc from "fast-check";
import { actAs, currentClaims, currentSession, jsonRequest, routeContext } from "./support/as-user";

vi.mock("@/lib/auth/session", () => ({ sessionUserId: vi.fn(async () => currentSession()?.user.id ?? null), sessionClaims: vi.fn(() => currentClaims()) }));
vi.mock("next/cache", () => ({ revalidatePath: vi.fn(), revalidateTag: vi.fn() }));
// Password checks are not under test here, and bcrypt at full cost would make the runs slow.
vi.mock("bcryptjs", () => ({ default: { hash: async () => "test-hash", compare: async () => false, hashSync: () => "test-hash" } }));

import { db, resetDatabase } from "./support/db";
import { seedDemo } from "@/db/seeds/demo";
import * as designs from "@/app/api/trials/[trialId]/designs/route";
import * as design from "@/app/api/trials/[trialId]/designs/[designId]/route";
import * as designLock from "@/app/api/trials/[trialId]/designs/[designId]/lock/route";
import * as designAmend from "@/app/api/trials/[trialId]/designs/[designId]/amend/route";
import * as preview from "@/app/api/trials/[trialId]/design-preview/route";
import * as calibrations from "@/app/api/trials/[trialId]/calibrations/route";
import * as lookOpen from "@/app/api/trials/[trialId]/analyses/[analysisId]/open/route";
import * as lookCounts from "@/app/api/trials/[trialId]/analyses/[analysisId]/counts/route";
import * as lookLock from "@/app/api/trials/[trialId]/analyses/[analysisId]/lock/route";
import * as lookReopen from "@/app/api/trials/[trialId]/analyses/[analysisId]/reopen/route";
import * as lookCountLevel from "@/app/api/trials/[trialId]/analyses/[analysisId]/count-level/route";
import * as uploadPreview from "@/app/api/trials/[trialId]/analyses/[analysisId]/upload/preview/route";
import * as uploadConfirm from "@/app/api/trials/[trialId]/analyses/[analysisId]/upload/confirm/route";
import * as recommendations from "@/app/api/trials/[trialId]/analyses/[analysisId]/recommendations/route";
import { createTrialAction } from "@/app/trials/new/actions";
import { scheduleMeeting } from "@/app/trials/[trialId]/meetings/actions";
import { recordRecommendationAction } from "@/app/trials/[trialId]/review/[analysisId]/actions";

// Payloads per route and action: three times fast-check's default of 100, about 5,000 hostile payloads a
// run in all. Each run draws a new seed (printed on a failure, to replay it), so the runs add up over time.
const RUNS = Number(process.env.CAIRN_BAD_INPUT_RUNS ?? 300);
let ids: Record<string, number>;

// A wrong signing password is refused and audited on purpose (an open row with no secret, issue 12):
// that row is the only thing a refusal may write.
const auditCount = async () => Number((await db("audit_events").whereNot({ action: "signature_password_failed" }).count({ n: "*" }).first())?.n);

// Values that break naive code.
const nastyValue = fc.oneof(
  fc.jsonValue(),
  fc.constantFrom("", " ", "'; DROP TABLE trials; --", "<script>alert(1)</script>", "x".repeat(10_000), "\u0000", -1, 0, 1.5, 1e309, -0, 2 ** 53, "NaN", null, [], {}),
);
/** Objects with the route's own keys (so validation gets past the shape) holding hostile values, or any JSON at all. */
const payload = (keys: string[]) =>
  fc.oneof(
    fc.dictionary(fc.constantFrom(...keys), nastyValue, { maxKeys: keys.length }),
    fc.jsonValue(),
    fc.string({ maxLength: 200 }).map((s) => ({ __raw: s })),
  );

function bodyOf(p: unknown): string {
  if (p && typeof p === "object" && "__raw" in (p as object)) return String((p as { __raw: string }).__raw);
  return JSON.stringify(p) ?? "null";
}

type Handler = (req: Request, ctx: { params: Promise<Record<string, string>> }) => Promise<Response>;

async function checkRoute(name: string, handler: Handler, method: string, params: () => Record<string, string>, keys: string[], as: () => number, contentType = "application/json") {
  actAs(as());
  await fc.assert(
    fc.asyncProperty(payload(keys), async (p) => {
      const before = await auditCount();
      const res = await handler(jsonRequest(`/x`, method, bodyOf(p), { "content-type": contentType }), routeContext(params()));
      expect(res.status, `${name} answered ${res.status} to ${bodyOf(p).slice(0, 200)}`).toBeLessThan(500);
      const text = await res.text();
      if (res.status >= 400) {
        expect(JSON.parse(text).error, `${name}: a refusal carries a message`).toEqual(expect.any(String));
        expect(await auditCount(), `${name}: a refused payload wrote something`).toBe(before);
      }
    }),
    { numRuns: RUNS },
  );
}

beforeAll(async () => {
  await resetDatabase();
  await seedDemo();
  const users = await db("users").select("id", "email");
  const byEmail = (e: string) => users.find((u: { email: string }) => u.email === e).id as number;
  const t1 = await db("trials").where({ code: "CRN-201" }).first();
  const look2 = await db("analyses").where({ trial_id: t1.id, look_number: 2 }).first();
  const look3 = await db("analyses").where({ trial_id: t1.id, look_number: 3 }).first();
  const lockedDesign = await db("designs").where({ trial_id: t1.id, status: "locked" }).first();
  ids = { stat: byEmail("statistician@cairn.example"), dmc: byEmail("dmc@cairn.example"), coord: byEmail("coordinator@cairn.example"), trial: t1.id, look2: look2.id, look3: look3.id, design: lockedDesign.id };
}, 120_000);

const trial = () => ({ trialId: String(ids.trial) });
const look = (k: "look2" | "look3") => () => ({ trialId: String(ids.trial), analysisId: String(ids[k]) });
const stat = () => ids.stat;

describe("write route handlers with generated payloads", () => {
  it("designs: create, update, lock, amend", async () => {
    await checkRoute("POST designs", designs.POST as Handler, "POST", trial, ["spec"], stat);
    const d = () => ({ ...trial(), designId: String(ids.design) });
    await checkRoute("PUT design", design.PUT as Handler, "PUT", d, ["spec", "rowVersion"], stat);
    await checkRoute("POST lock design", designLock.POST as Handler, "POST", d, ["password", "rowVersion"], stat);
    await checkRoute("POST amend design", designAmend.POST as Handler, "POST", d, ["reason"], stat);
  }, 900_000);

  it("design preview and calibration", async () => {
    await checkRoute("POST design-preview", preview.POST as Handler, "POST", trial, ["spec"], stat);
    await checkRoute("POST calibrations", calibrations.POST as Handler, "POST", trial, ["spec", "typeIErrorLimit", "powerTarget", "thetaT", "thetaL", "thetaU"], stat);
  }, 900_000);

  it("interim data: open, counts, lock, reopen, CSV preview and confirm", async () => {
    await checkRoute("POST open look", lookOpen.POST as Handler, "POST", look("look3"), ["rowVersion", "cutoffDate"], stat);
    await checkRoute("PUT counts", lookCounts.PUT as Handler, "PUT", look("look3"), ["rowVersion", "cutoffDate", "counts", "reason"], stat);
    await checkRoute("POST lock look", lookLock.POST as Handler, "POST", look("look3"), ["rowVersion", "password"], stat);
    await checkRoute("POST reopen look", lookReopen.POST as Handler, "POST", look("look2"), ["rowVersion", "reason"], stat);
    await checkRoute("POST switch to count-level", lookCountLevel.POST as Handler, "POST", look("look3"), ["rowVersion", "reason"], stat);
    await checkRoute("POST upload preview", uploadPreview.POST as Handler, "POST", look("look3"), ["subject_id", "arm"], stat, "text/csv");
    await checkRoute("POST upload confirm", uploadConfirm.POST as Handler, "POST", look("look3"), ["subject_id", "arm"], stat, "text/csv");
  }, 900_000);

  it("recommendations", async () => {
    await checkRoute("POST recommendation", recommendations.POST as Handler, "POST", look("look2"), ["decision", "rationale", "password", "correctsId"], () => ids.dmc);
  }, 900_000);
});

function formOf(entries: Record<string, unknown>): FormData {
  const f = new FormData();
  for (const [k, v] of Object.entries(entries)) f.set(k, typeof v === "string" ? v : JSON.stringify(v) ?? "");
  return f;
}

async function checkAction(name: string, action: (prev: never, form: FormData) => Promise<unknown>, keys: string[], as: () => number, fixed: () => Record<string, string> = () => ({})) {
  actAs(as());
  await fc.assert(
    fc.asyncProperty(fc.dictionary(fc.constantFrom(...keys), nastyValue, { maxKeys: keys.length }), async (p) => {
      const before = await auditCount();
      let state: { ok?: unknown; error?: unknown } | undefined;
      try {
        state = (await action({} as never, formOf({ ...p, ...fixed() }))) as typeof state;
      } catch (e) {
        // A successful action may end in redirect(), which Next implements by throwing.
        if ((e as { digest?: string }).digest?.startsWith("NEXT_REDIRECT")) return;
        throw new Error(`${name} threw on ${JSON.stringify(p).slice(0, 200)}: ${String(e)}`);
      }
      if (!state?.ok) {
        expect(state?.error, `${name}: a refusal carries a message`).toBeTruthy();
        expect(await auditCount(), `${name}: a refused payload wrote something`).toBe(before);
      }
    }),
    { numRuns: RUNS },
  );
}

describe("server actions with generated form data", () => {
  it("create a trial", async () => {
    await checkAction("createTrialAction", createTrialAction as never, ["code", "phase", "title", "sponsorName", "designType", "armLabel", "experimentalArmLabel", "controlArmLabel", "endpointName", "toxicityEndpointName", "targetEnrolment"], stat);
  }, 900_000);

  it("schedule a meeting", async () => {
    await checkAction("scheduleMeeting", scheduleMeeting as never, ["scheduledLocal", "timeZone", "analysisId", "attendeeIds", "openAgenda", "closedAgenda", "reminderDaysBefore"], () => ids.coord, trial);
  }, 900_000);

  it("record a recommendation", async () => {
    await checkAction("recordRecommendationAction", recordRecommendationAction as never, ["decision", "rationale", "password", "correctsId"], () => ids.dmc, look("look2"));
  }, 900_000);
});
