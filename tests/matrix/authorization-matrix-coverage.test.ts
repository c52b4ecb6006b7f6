/**
 * The authorization matrix cannot fall behind the app: every page, every exported HTTP method of
 * every route handler and every exported server action must have a row, and no row may name
 * something that does not exist. The second group shows the check can fail, on a fake app tree.
 */
import { mkdtempSync, mkdirSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { compareWithMatrix, enumerateAppSurface, exportedActionNames, exportedMethods, isServerActionModule, resolveRoute } from "../e2e/support/app-surface";
import { AUTHORIZATION_MATRIX, ROLES, findOutcomeData } from "../e2e/support/authorization-matrix";

const ROOT = path.resolve(import.meta.dirname, "../..");

describe("an unlisted page, route method or server action (an endpoint nobody checks for blinding)", () => {
  const surface = enumerateAppSurface(ROOT);

  it("finds the app's surface at all (pages, route methods and actions)", () => {
    // Floors, not exact counts: the app grows. Exact identities are checked on the fake tree below.
    expect(surface.filter((e) => e.kind === "page").length).toBeGreaterThanOrEqual(15);
    expect(surface.filter((e) => e.kind === "api").length).toBeGreaterThanOrEqual(30);
    expect(surface.filter((e) => e.kind === "action").length).toBeGreaterThanOrEqual(12);
  });

  it("every page, route handler method and server action of app/ has a matrix row", () => {
    const { missing } = compareWithMatrix(surface, AUTHORIZATION_MATRIX);
    expect(missing, "add a row to tests/e2e/support/authorization-matrix.ts for each (DEVELOPERS.md explains how)").toEqual([]);
  });

  it("no matrix row names a page, method or action the app does not have", () => {
    expect(compareWithMatrix(surface, AUTHORIZATION_MATRIX).stale).toEqual([]);
  });

  it("every row says what every role gets", () => {
    for (const row of AUTHORIZATION_MATRIX) expect(Object.keys(row.expect).sort(), `${row.method} ${row.path}`).toEqual([...ROLES].sort());
  });
});

describe("the coverage check reports what a fake app tree adds", () => {
  const root = mkdtempSync(path.join(tmpdir(), "cairn-surface-"));
  afterAll(() => rmSync(root, { recursive: true, force: true }));
  const put = (rel: string, text: string) => {
    mkdirSync(path.dirname(path.join(root, rel)), { recursive: true });
    writeFileSync(path.join(root, rel), text);
  };
  put("app/trials/page.tsx", "export default function P() { return null; }");
  put("app/trials/new/page.tsx", "export default function P() { return null; }");
  put("app/trials/[trialId]/page.tsx", "export default function P() { return null; }");
  put("app/(group)/about/page.tsx", "export default function P() { return null; }");
  put("app/api/trials/[trialId]/things/route.ts", "export const GET = handle(async () => x);\nexport async function POST() {}\n");
  put("app/api/auth/[...all]/route.ts", "const h = 1;\nexport { h as GET, h as POST };\n");
  put("app/trials/[trialId]/actions.ts", '/** why */\n"use server";\nexport async function doThing() {}\nexport const other = async () => 1;\nasync function helper() {}\n');
  put("app/trials/[trialId]/not-actions.ts", 'export async function notAnAction() {}\nconst s = "use server";\n');
  put("app/trials/[trialId]/schemas.test.ts", "export async function GET() {}\n");

  it("enumerates pages, methods (each form of export) and actions, ignoring route groups and non-action modules", () => {
    const keys = enumerateAppSurface(root).map((e) => (e.kind === "action" ? `action ${e.action}` : `${e.kind} ${e.method} ${e.route}`));
    expect(keys.sort()).toEqual(
      [
        "page GET /about",
        "page GET /trials",
        "page GET /trials/new",
        "page GET /trials/[trialId]",
        "api GET /api/trials/[trialId]/things",
        "api POST /api/trials/[trialId]/things",
        "api GET /api/auth/[...all]",
        "api POST /api/auth/[...all]",
        "action app/trials/[trialId]/actions.ts#doThing",
        "action app/trials/[trialId]/actions.ts#other",
      ].sort(),
    );
  });

  it("reports the route method, page and action without a row, and a row naming nothing", () => {
    const rows = [
      { kind: "page" as const, method: "GET", path: "/trials" },
      { kind: "page" as const, method: "GET", path: "/trials/new" },
      { kind: "page" as const, method: "GET", path: "/about" },
      { kind: "api" as const, method: "GET", path: "/api/trials/{trial}/things?x=1" },
      { kind: "api" as const, method: "GET", path: "/api/auth/session" },
      { kind: "api" as const, method: "POST", path: "/api/auth/callback/credentials" },
      { kind: "action" as const, method: "POST", path: "/trials/{trial}", action: "app/trials/[trialId]/actions.ts#doThing" },
      { kind: "api" as const, method: "DELETE", path: "/api/trials/{trial}/things" },
    ];
    const { missing, stale } = compareWithMatrix(enumerateAppSurface(root), rows);
    // "/trials/new" must not count as covering "/trials/[trialId]" (the static route wins, as in Next.js).
    expect(missing.sort()).toEqual(["action app/trials/[trialId]/actions.ts#other", "api POST /api/trials/[trialId]/things", "page GET /trials/[trialId]"].sort());
    expect(stale).toEqual(["api DELETE /api/trials/{trial}/things"]);
  });

  it("parses the export forms Next.js accepts", () => {
    expect(exportedMethods("export const GET = 1; export async function PUT() {}; export function DELETE() {}")).toEqual(["GET", "PUT", "DELETE"]);
    expect(exportedMethods("export { handler as GET, handler as POST };")).toEqual(["GET", "POST"]);
    expect(exportedMethods("export const dynamic = 'force-dynamic'; const GET = 1;")).toEqual([]);
    expect(isServerActionModule("// c\n/* d */\n'use server';\nexport async function a() {}")).toBe(true);
    expect(isServerActionModule("import x from 'y';\n'use server';")).toBe(false);
    expect(exportedActionNames("export async function a() {}\nexport { b, c as d };\nexport type T = 1;")).toEqual(["a", "b", "d"]);
    expect(resolveRoute("/trials/new", ["/trials/[trialId]", "/trials/new"])).toBe("/trials/new");
    expect(resolveRoute("/trials/7", ["/trials/[trialId]", "/trials/new"])).toBe("/trials/[trialId]");
    expect(resolveRoute("/", ["/", "/trials"])).toBe("/");
  });
});

describe("the closed-data markers read words, not random tokens", () => {
  it("finds HPD as a word of the page, and not inside a CSP nonce (a real nonce once held it)", () => {
    expect(findOutcomeData('<p>95% HPD interval</p>')).toEqual(["posterior summary heading"]);
    expect(findOutcomeData('<script nonce="SNgb+gX2HPDOoFT0ABfPfQ=="></script>')).toEqual([]);
    expect(findOutcomeData('<span class="HPD_variable">')).toEqual([]);
  });
});
