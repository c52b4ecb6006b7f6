import { describe, expect, it } from "vitest";
import { firstLoadFiles, parseClientReferenceManifest, verdict, KB } from "./page-weight";

// The shape Next.js 16 writes to server/app/**/page_client-reference-manifest.js (abridged).
const MANIFEST = `globalThis.__RSC_MANIFEST = (globalThis.__RSC_MANIFEST || {});
globalThis.__RSC_MANIFEST["/trials/[trialId]/review/[analysisId]/page"] = {"moduleLoading":{"prefix":"/_next/"},"clientModules":{},"entryCSSFiles":{},"entryJSFiles":{"[project]/app/layout":["static/chunks/a.js","static/chunks/b.js"],"[project]/app/trials/[trialId]/layout":["static/chunks/a.js","static/chunks/b.js","static/chunks/c.js"],"[project]/app/trials/[trialId]/review/[analysisId]/page":["static/chunks/a.js","static/chunks/d.js"]}};`;

describe("parseClientReferenceManifest", () => {
  it("lists each route's entry files once, from every layout and the page", () => {
    const routes = parseClientReferenceManifest(MANIFEST);
    expect([...routes.keys()]).toEqual(["/trials/[trialId]/review/[analysisId]/page"]);
    expect(routes.get("/trials/[trialId]/review/[analysisId]/page")).toEqual(["static/chunks/a.js", "static/chunks/b.js", "static/chunks/c.js", "static/chunks/d.js"]);
  });
  it("refuses a file that assigns no manifest, or a route without entryJSFiles", () => {
    expect(() => parseClientReferenceManifest("var x = 1;")).toThrow(/no __RSC_MANIFEST/);
    expect(() => parseClientReferenceManifest(`globalThis.__RSC_MANIFEST = {"/p": {"clientModules": {}}};`)).toThrow(/no entryJSFiles/);
  });
  it("runs the manifest in an empty context: it cannot reach this process", () => {
    expect(() => parseClientReferenceManifest(`globalThis.__RSC_MANIFEST = {"/p": {"entryJSFiles": {"x": [String(typeof process)]}}};`)).not.toThrow();
    expect(parseClientReferenceManifest(`globalThis.__RSC_MANIFEST = {"/p": {"entryJSFiles": {"x": [String(typeof process)]}}};`).get("/p")).toEqual(["undefined"]);
  });
});

describe("firstLoadFiles and verdict", () => {
  it("adds the root main files, each file once, JavaScript only", () => {
    expect(firstLoadFiles(["static/chunks/r.js", "static/chunks/a.js"], ["static/chunks/a.js", "static/chunks/s.css", "static/chunks/p.js"])).toEqual(["static/chunks/r.js", "static/chunks/a.js", "static/chunks/p.js"]);
  });
  it("passes under the budgets and names every page and chunk over them", () => {
    expect(verdict([{ route: "/a", gzipBytes: 249 * KB, files: 3 }], [{ file: "plot.js", gzipBytes: 400 * KB }])).toEqual([]);
    const problems = verdict([{ route: "/a", gzipBytes: 251 * KB, files: 3 }, { route: "/b", gzipBytes: 10 * KB, files: 1 }], [{ file: "plot.js", gzipBytes: 501 * KB }]);
    expect(problems).toHaveLength(2);
    expect(problems[0]).toMatch(/^\/a: first-load JavaScript 251\.0 KB/);
    expect(problems[1]).toMatch(/^chart chunk plot\.js: 501\.0 KB/);
  });
  it("fails when nothing was measured (a wrong folder must not pass)", () => {
    expect(verdict([], [])).toHaveLength(2);
  });
});
