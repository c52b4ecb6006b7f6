/**
 * Personal API tokens against the real database and the real route handlers: a statistician's token
 * uploads counts and a patient CSV and reads the open status; a revoked or expired token, a token for
 * another trial, a blinded role's token on closed routes and any token on a signature route are
 * refused; every use is an open audit row; only the hash is stored.
 */
import { beforeAll, describe, expect, it, vi } from "vitest";
import { createHash } from "node:crypto";
import { seedDemo } from "@/db/seeds/demo";
import { GET as openStatusGet } from "@/app/api/trials/[trialId]/open-status/route";
import { GET as lookGet } from "@/app/api/trials/[trialId]/analyses/[analysisId]/route";
import { GET as analysesGet } from "@/app/api/trials/[trialId]/analyses/route";
import { PUT as countsPut } from "@/app/api/trials/[trialId]/analyses/[analysisId]/counts/route";
import { POST as previewPost } from "@/app/api/trials/[trialId]/analyses/[analysisId]/upload/preview/route";
import { POST as confirmPost } from "@/app/api/trials/[trialId]/analyses/[analysisId]/upload/confirm/route";
import { POST as lockPost } from "@/app/api/trials/[trialId]/analyses/[analysisId]/lock/route";
import { POST as recommendationPost } from "@/app/api/trials/[trialId]/analyses/[analysisId]/recommendations/route";
import { GET as reviewGet } from "@/app/api/trials/[trialId]/analyses/[analysisId]/review/route";
import { GET as rScriptGet } from "@/app/api/trials/[trialId]/analyses/[analysisId]/review/r-script/route";
import { GET as patientsGet } from "@/app/api/trials/[trialId]/analyses/[analysisId]/patients/route";
import { POST as designLockPost } from "@/app/api/trials/[trialId]/designs/[designId]/lock/route";
import { openLookForEntry } from "@/lib/analyses/service";
import { createApiToken, revokeApiToken, MAX_TOKEN_DAYS } from "@/lib/auth/api-tokens";
import { actAs, currentClaims, currentSession, routeContext } from "./support/as-user";
import { db, resetDatabase } from "./support/db";
import type { PublicUser } from "@/db/types";
import { checkTrialAccess } from "@/lib/auth";
/** The statistician's access for the data-entry services (they re-check enterData themselves). */
const enter = (u: Parameters<typeof checkTrialAccess>[0], trialId: number) => checkTrialAccess(u, trialId, "enterData");

vi.mock("@/lib/auth/session", () => ({ sessionUserId: vi.fn(async () => currentSession()?.user.id ?? null), sessionClaims: vi.fn(() => currentClaims()) }));
vi.mock("next/cache", () => ({ revalidatePath: vi.fn(), revalidateTag: vi.fn() }));

const PASSWORDS = { statistician: "demo-stat-pass", dmc: "demo-dmc-pass" };
let stat: PublicUser;
let dmc: PublicUser;
let sponsor: PublicUser;
let single: { id: number; look3: number; locked: number; designId: number };
let two: { id: number; locked: number };

async function userByEmail(email: string): Promise<PublicUser> {
  const u = await db("users").where({ email }).first();
  return { id: u.id, email: u.email, name: u.name, isAdmin: !!u.is_admin, isActive: !!u.is_active };
}

function req(path: string, token: string | null, init: { method?: string; body?: string; contentType?: string } = {}) {
  const headers: Record<string, string> = {};
  if (token !== null) headers.authorization = `Bearer ${token}`;
  if (init.contentType) headers["content-type"] = init.contentType;
  return new Request(`http://localhost${path}`, { method: init.method ?? "GET", body: init.body, headers });
}

const trialCtx = (trialId: number) => routeContext({ trialId: String(trialId) });
const lookCtx = (trialId: number, analysisId: number) => routeContext({ trialId: String(trialId), analysisId: String(analysisId) });

async function auditRows(action: string) {
  return db("audit_events").where({ action }).orderBy("id");
}

async function countRows(table: string): Promise<number> {
  return Number((await db(table).count({ n: "*" }).first())?.n);
}

beforeAll(async () => {
  await resetDatabase();
  await seedDemo();
  stat = await userByEmail("statistician@cairn.example");
  dmc = await userByEmail("dmc@cairn.example");
  sponsor = await userByEmail("sponsor@cairn.example");
  const t1 = await db("trials").where({ code: "CRN-201" }).first();
  const t2 = await db("trials").where({ code: "CRN-305" }).first();
  const look3 = await db("analyses").where({ trial_id: t1.id, look_number: 3 }).first();
  const locked1 = await db("analyses").where({ trial_id: t1.id, look_number: 2 }).first();
  const locked2 = await db("analyses").where({ trial_id: t2.id, look_number: 1 }).first();
  const design = await db("designs").where({ trial_id: t1.id }).first();
  single = { id: t1.id, look3: look3.id, locked: locked1.id, designId: design.id };
  two = { id: t2.id, locked: locked2.id };
  // The statistician opens look 3 in the browser (a session); the export job fills it with a token.
  actAs(stat.id);
  await openLookForEntry(await enter(stat, single.id), single.look3, { rowVersion: look3.row_version, cutoffDate: "2026-12-31" });
  actAs(null);
});

describe("personal API tokens", () => {
  let token: string;
  let tokenId: number;

  it("are shown once and stored only as the SHA-256 of the secret", async () => {
    const made = await createApiToken(stat, { trialId: single.id, role: "unblinded_statistician", label: "nightly export", days: 30 });
    token = made.token;
    tokenId = made.id;
    expect(token).toMatch(/^cairn_pat_[A-Za-z0-9_-]{43}$/);
    const row = await db("api_tokens").where({ id: tokenId }).first();
    expect(row.token_sha256).toBe(createHash("sha256").update(token).digest("hex"));
    // The secret appears nowhere in the database: not in the token row, not in the audit trail.
    expect(JSON.stringify(row)).not.toContain(token.slice(10));
    const audit = await db("audit_events").where({ entity_type: "api_token" });
    expect(JSON.stringify(audit)).not.toContain(token.slice(10));
    expect(audit.map((a) => a.action)).toEqual(["api_token_created"]);
    expect(audit[0].visibility).toBe("open");
  });

  it("are made only for a role the owner holds on the trial, for at most 90 days", async () => {
    await expect(createApiToken(stat, { trialId: single.id, role: "dmc_member", label: "x", days: 30 })).rejects.toMatchObject({ status: 404 });
    await expect(createApiToken(sponsor, { trialId: single.id, role: "unblinded_statistician", label: "x", days: 30 })).rejects.toMatchObject({ status: 404 });
    await expect(createApiToken(stat, { trialId: single.id, role: "unblinded_statistician", label: "x", days: MAX_TOKEN_DAYS + 1 })).rejects.toThrow(/at most 90 days/);
    await expect(createApiToken(stat, { trialId: single.id, role: "unblinded_statistician", label: "", days: 30 })).rejects.toThrow(/Name the token/);
  });

  it("read the open status and the looks, and every use is an audited open row", async () => {
    actAs(null);
    const before = (await auditRows("api_token_used")).length;
    const res = await openStatusGet(req(`/api/trials/${single.id}/open-status`, token), trialCtx(single.id));
    expect(res.status).toBe(200);
    expect((await res.json()).trial.code).toBe("CRN-201");
    const list = await analysesGet(req(`/api/trials/${single.id}/analyses`, token), trialCtx(single.id));
    expect(list.status).toBe(200);
    const used = await auditRows("api_token_used");
    expect(used.length).toBe(before + 2);
    const last = used[used.length - 1];
    expect(last).toMatchObject({ actor_user_id: stat.id, trial_id: single.id, entity_id: String(tokenId), visibility: "open" });
    expect(JSON.parse(last.new_values)).toMatchObject({ outcome: "accepted", method: "GET", path: `/api/trials/${single.id}/analyses`, capability: "viewOpen" });
  });

  it("upload typed counts and a patient CSV for an export job, written in the owner's name", async () => {
    const look = await (await lookGet(req(`/api/trials/${single.id}/analyses/${single.look3}`, token), lookCtx(single.id, single.look3))).json();
    const arm = look.arms[0].id;
    const put = await countsPut(
      req(`/api/trials/${single.id}/analyses/${single.look3}/counts`, token, {
        method: "PUT",
        contentType: "application/json",
        body: JSON.stringify({ rowVersion: look.analysis.rowVersion, cutoffDate: "2026-12-31", counts: [{ armId: arm, enrolled: 31, treated: 31, evaluable: 30, responders: 9, toxicities: 4 }] }),
      }),
      lookCtx(single.id, single.look3),
    );
    expect(put.status, await put.clone().text()).toBe(200);
    const saved = await db("analysis_arm_counts").where({ analysis_id: single.look3 }).first();
    expect(saved).toMatchObject({ enrolled: 31, evaluable: 30, responders: 9 });
    const write = await db("audit_events").where({ entity_type: "analysis", entity_id: String(single.look3) }).orderBy("id", "desc").first();
    expect(write.actor_user_id).toBe(stat.id);

    // 32 patients: 31 evaluable for response, 10 responders, 5 with toxicity, all treated.
    const lines = ["subject_id,arm,enrolment_date,evaluable,response,toxicity,treated"];
    for (let i = 1; i <= 32; i++) lines.push(`P-${String(i).padStart(3, "0")},single,2026-${String(1 + (i % 11)).padStart(2, "0")}-15,${i <= 31 ? "yes" : "no"},${i <= 31 ? (i <= 10 ? "yes" : "no") : ""},${i <= 5 ? "yes" : "no"},yes`);
    const csv = lines.join("\n") + "\n";
    const preview = await previewPost(req(`/api/trials/${single.id}/analyses/${single.look3}/upload/preview`, token, { method: "POST", contentType: "text/csv", body: csv }), lookCtx(single.id, single.look3));
    const p = await preview.json();
    expect(preview.status, JSON.stringify(p)).toBe(200);
    expect(p.ok, JSON.stringify(p)).toBe(true);
    const rowVersion = (await db("analyses").where({ id: single.look3 }).first()).row_version;
    const confirm = await confirmPost(
      req(`/api/trials/${single.id}/analyses/${single.look3}/upload/confirm?rowVersion=${rowVersion}&fileName=export.csv`, token, { method: "POST", contentType: "text/csv", body: csv }),
      lookCtx(single.id, single.look3),
    );
    expect(confirm.status, await confirm.clone().text()).toBe(200);
    expect(await countRows("patient_outcomes")).toBe(32);
  });

  it("cannot sign: locking a look, locking a design or recording a recommendation refuses a bearer token and changes nothing", async () => {
    actAs(null);
    const dmcToken = (await createApiToken(dmc, { trialId: single.id, role: "dmc_member", label: "dmc job", days: 7 })).token;
    const signatures = await countRows("signatures");
    const recs = await countRows("recommendations");
    const statusBefore = (await db("analyses").where({ id: single.look3 }).first()).status;
    const lock = await lockPost(
      req(`/api/trials/${single.id}/analyses/${single.look3}/lock`, token, { method: "POST", contentType: "application/json", body: JSON.stringify({ rowVersion: 1, password: PASSWORDS.statistician }) }),
      lookCtx(single.id, single.look3),
    );
    expect(lock.status).toBe(401);
    const design = await designLockPost(
      req(`/api/trials/${single.id}/designs/${single.designId}/lock`, token, { method: "POST", contentType: "application/json", body: JSON.stringify({ rowVersion: 1, password: PASSWORDS.statistician }) }),
      routeContext({ trialId: String(single.id), designId: String(single.designId) }),
    );
    expect(design.status).toBe(401);
    const rec = await recommendationPost(
      req(`/api/trials/${single.id}/analyses/${single.locked}/recommendations`, dmcToken, { method: "POST", contentType: "application/json", body: JSON.stringify({ decision: "continue", rationale: "from a token", password: PASSWORDS.dmc }) }),
      lookCtx(single.id, single.locked),
    );
    expect(rec.status).toBe(401);
    expect(await countRows("signatures")).toBe(signatures);
    expect(await countRows("recommendations")).toBe(recs);
    expect((await db("analyses").where({ id: single.look3 }).first()).status).toBe(statusBefore);
  });

  it("for trial A answer 404 on trial B, audited as refused", async () => {
    const res = await openStatusGet(req(`/api/trials/${two.id}/open-status`, token), trialCtx(two.id));
    expect(res.status).toBe(404);
    const refused = (await auditRows("api_token_refused")).pop();
    expect(JSON.parse(refused.new_values)).toMatchObject({ outcome: "other trial", requestedTrialId: two.id });
    expect(refused.trial_id).toBe(single.id);
  });

  it("of a sponsor read the open status but no closed route, and never arm-level counts", async () => {
    const sponsorToken = (await createApiToken(sponsor, { trialId: two.id, role: "sponsor", label: "sponsor dashboard", days: 10 })).token;
    expect((await openStatusGet(req(`/api/trials/${two.id}/open-status`, sponsorToken), trialCtx(two.id))).status).toBe(200);
    const look = await lookGet(req(`/api/trials/${two.id}/analyses/${two.locked}`, sponsorToken), lookCtx(two.id, two.locked));
    expect(look.status).toBe(200);
    const body = await look.json();
    expect(body.counts).toBeUndefined();
    expect(body.patientRows).toBeUndefined();
    for (const [route, path] of [
      [reviewGet, "review"],
      [rScriptGet, "review/r-script"],
      [patientsGet, "patients"],
    ] as const) {
      const res = await route(req(`/api/trials/${two.id}/analyses/${two.locked}/${path}`, sponsorToken), lookCtx(two.id, two.locked));
      expect(res.status, path).toBe(401);
    }
    // An opted-in route that needs a capability the sponsor lacks: 403, and the refusal is audited.
    const put = await countsPut(req(`/api/trials/${two.id}/analyses/${two.locked}/counts`, sponsorToken, { method: "PUT", contentType: "application/json", body: "{}" }), lookCtx(two.id, two.locked));
    expect(put.status).toBe(403);
    expect(JSON.parse((await auditRows("api_token_refused")).pop().new_values)).toMatchObject({ outcome: "refused 403", capability: "enterData" });
  });

  it("refuse a revoked token and an expired one", async () => {
    const spare = await createApiToken(stat, { trialId: single.id, role: "unblinded_statistician", label: "to revoke", days: 5 });
    expect((await openStatusGet(req(`/api/trials/${single.id}/open-status`, spare.token), trialCtx(single.id))).status).toBe(200);
    await revokeApiToken(stat, spare.id);
    await expect(revokeApiToken(stat, spare.id)).rejects.toMatchObject({ status: 409 });
    await expect(revokeApiToken(sponsor, tokenId)).rejects.toMatchObject({ status: 404 });
    const revoked = await openStatusGet(req(`/api/trials/${single.id}/open-status`, spare.token), trialCtx(single.id));
    expect(revoked.status).toBe(401);
    expect((await revoked.json()).error).toMatch(/unknown, expired or revoked/);
    expect(JSON.parse((await auditRows("api_token_refused")).pop().new_values)).toMatchObject({ outcome: "revoked" });

    // Made 3 days ago for 2 days: expired yesterday.
    const old = await createApiToken(stat, { trialId: single.id, role: "unblinded_statistician", label: "short-lived", days: 2 }, new Date(Date.now() - 3 * 86_400_000));
    expect((await openStatusGet(req(`/api/trials/${single.id}/open-status`, old.token), trialCtx(single.id))).status).toBe(401);
    expect(JSON.parse((await auditRows("api_token_refused")).pop().new_values)).toMatchObject({ outcome: "expired" });

    // A well-formed secret that was never issued, and a malformed one.
    expect((await openStatusGet(req(`/api/trials/${single.id}/open-status`, `cairn_pat_${"A".repeat(43)}`), trialCtx(single.id))).status).toBe(401);
    expect((await openStatusGet(req(`/api/trials/${single.id}/open-status`, "not-a-token"), trialCtx(single.id))).status).toBe(401);
  });

  it("stop working when the owner loses the role", async () => {
    const coordinator = await userByEmail("coordinator@cairn.example");
    const made = await createApiToken(coordinator, { trialId: single.id, role: "coordinator", label: "meetings sync", days: 5 });
    expect((await openStatusGet(req(`/api/trials/${single.id}/open-status`, made.token), trialCtx(single.id))).status).toBe(200);
    await db("trial_memberships").where({ user_id: coordinator.id, trial_id: single.id, role: "coordinator" }).delete();
    expect((await openStatusGet(req(`/api/trials/${single.id}/open-status`, made.token), trialCtx(single.id))).status).toBe(401);
    expect(JSON.parse((await auditRows("api_token_refused")).pop().new_values)).toMatchObject({ outcome: "role no longer held" });
  });

  it("are not accepted on routes that did not opt in, even for a role that may use them", async () => {
    // The statistician may read the closed review with a session, but not with a token.
    const res = await reviewGet(req(`/api/trials/${single.id}/analyses/${single.locked}/review`, token), lookCtx(single.id, single.locked));
    expect(res.status).toBe(401);
  });
});
