/**
 * The production launcher (scripts/serve.mjs) replaces a web process whose memory passes its
 * ceiling without refusing a request: the replacement starts first, then the old one finishes what
 * it has and exits. Here the ceiling is 1 MB, so every process is replaced as soon as it is checked,
 * over and over (one at a time, each after a 6 s drain), while clients keep asking. Needs a production build (scripts/test builds first).
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { execFileSync, spawn, type ChildProcess } from "node:child_process";
import { existsSync } from "node:fs";
import path from "node:path";

const root = path.resolve(__dirname, "../..");
const APP_PORT = 3112;
const base = `http://localhost:${APP_PORT}`;
const distDir = process.env.NEXT_DIST_DIR || ".next";
const built = existsSync(path.join(root, distDir, "BUILD_ID"));
if (!built && process.env.CI) throw new Error(`no production build in ${distDir}: run next build first`);

let app: ChildProcess | undefined;
let log = "";

const webProcesses = (): number[] => {
  try {
    return execFileSync("pgrep", ["-P", String(app!.pid)]).toString().trim().split("\n").filter(Boolean).map(Number);
  } catch {
    return [];
  }
};

beforeAll(async () => {
  if (!built) return;
  app = spawn("node", ["scripts/serve.mjs", "-p", String(APP_PORT), "--workers", "2"], {
    cwd: root,
    env: { ...process.env, NODE_ENV: "production", NEXTAUTH_URL: base, CAIRN_WEB_MAX_RSS_MB: "1", CAIRN_WEB_MEMORY_CHECK_MS: "1000" },
    stdio: ["ignore", "pipe", "pipe"],
    detached: true,
  });
  app.stdout!.on("data", (d: Buffer) => (log += d.toString()));
  app.stderr!.on("data", (d: Buffer) => (log += d.toString()));
  const t0 = Date.now();
  while (Date.now() - t0 < 60_000) {
    if ((await fetch(`${base}/api/health`).catch(() => null))?.status === 200) return;
    await new Promise((r) => setTimeout(r, 200));
  }
  throw new Error(`the launcher did not answer:\n${log}`);
}, 90_000);

afterAll(() => {
  if (app?.pid) {
    try {
      process.kill(-app.pid, "SIGTERM");
    } catch {
      /* gone */
    }
  }
});

describe.skipIf(!built)("web process replacement", () => {
  it("replaces processes over their memory ceiling while every request, kept-alive or not, is answered", async () => {
    const seen = new Set<number>(webProcesses());
    const failures: string[] = [];
    let answered = 0;
    const until = Date.now() + 30_000;
    const client = async (headers: Record<string, string>) => {
      while (Date.now() < until) {
        try {
          const r = await fetch(`${base}/api/health`, { headers, signal: AbortSignal.timeout(5000) });
          await r.text();
          if (r.status === 200) answered++;
          else failures.push(`HTTP ${r.status}`);
        } catch (e) {
          failures.push(`${headers.connection ?? "keep-alive"}: ${String((e as { cause?: { code?: string } }).cause?.code ?? e)}`);
        }
      }
    };
    const watch = (async () => {
      while (Date.now() < until) {
        for (const pid of webProcesses()) seen.add(pid);
        await new Promise((r) => setTimeout(r, 250));
      }
    })();
    await Promise.all([client({}), client({}), client({}), client({ connection: "close" }), client({ connection: "close" }), watch]);
    const replacements = (log.match(/replacing it/g) ?? []).length;
    console.log(`[web processes] ${replacements} replacements in 30 s, ${answered} requests answered, ${failures.length} failed`);
    expect(failures).toEqual([]);
    expect(replacements).toBeGreaterThanOrEqual(2);
    // The two first processes and at least two of their successors.
    expect(seen.size).toBeGreaterThanOrEqual(4);
    // Replaced processes exit: two remain (a third only while one is being replaced).
    const t0 = Date.now();
    while (webProcesses().length > 3 && Date.now() - t0 < 30_000) await new Promise((r) => setTimeout(r, 200));
    expect(webProcesses().length).toBeLessThanOrEqual(3);
  }, 120_000);
});
