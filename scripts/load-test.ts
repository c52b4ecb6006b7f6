/**
 * Load test against a running production server on loopback (autocannon).
 *   npx tsx scripts/load-test.ts [--base http://localhost:3000] [--seconds 60] [--connections 50] [--during-calibration] [--only interval]
 *                                [--users N] [--rate R]
 * Signs in as the demo DMC member (or, with --users N, as N different reviewers made by
 * scripts/load-accounts.ts, one per client in turn), then for each target route runs `connections`
 * concurrent keep-alive clients for `seconds` and prints requests/s, p50/p95/p99 latency (exact, from
 * every response time) and errors, after an unrecorded 5 s warm-up per route. Without --rate each
 * client sends its next request as soon as the last is answered (saturation: the latency is then
 * mostly queueing, and the figure that matters is requests/s); with --rate R each client asks R times a
 * second on average, as a person does (the closed review's interval question waits 250 ms after the
 * last keystroke, so one person asks at most 4 times a second). People do not ask in step: each
 * client's questions are a Poisson stream of its own (exponential gaps), over its own keep-alive
 * connection, and each latency is counted from the moment the question was due, so a slow answer
 * that delays the client's next question counts against the server (no coordinated omission).
 * autocannon's own rate limit fires every client on the same timer, in bursts of 50, which measures
 * the bursts rather than the server. With --during-calibration a 40 x 40 calibration runs on the server at
 * the same time, to show that CPU-heavy work stays off the request path. Against the server that
 * `scripts/up` started, it ends with the resident memory of each web process.
 */
import autocannon from "autocannon";
import http from "node:http";
import { execFileSync } from "node:child_process";
import { existsSync, readFileSync } from "node:fs";
import path from "node:path";
import { signInCookie } from "../tests/support/http-session";

function arg(name: string, fallback: string): string {
  const i = process.argv.indexOf(`--${name}`);
  return i >= 0 && process.argv[i + 1] && !process.argv[i + 1].startsWith("--") ? process.argv[i + 1] : fallback;
}
const base = arg("base", "http://localhost:3000");
const seconds = Number(arg("seconds", "60"));
const connections = Number(arg("connections", "50"));
const duringCalibration = process.argv.includes("--during-calibration");
const WARM_UP_SECONDS = 5;
/** Runs only the routes whose name contains this text (for a quicker look at one route). */
const only = arg("only", "");
const users = Number(arg("users", "1"));
const rate = Number(arg("rate", "0"));

function percentile(sorted: number[], p: number): number {
  if (!sorted.length) return NaN;
  const i = Math.min(sorted.length - 1, Math.max(0, Math.ceil((p / 100) * sorted.length) - 1));
  return sorted[i];
}

/** Signs in N reviewers (made once by scripts/load-accounts.ts in the server's database). */
async function reviewerCookies(n: number): Promise<string[]> {
  const out = execFileSync("bash", ["scripts/with-env", "npx", "tsx", "--conditions=react-server", "scripts/load-accounts.ts", String(n)], { cwd: path.resolve(import.meta.dirname, ".."), encoding: "utf8" });
  const { accounts, password } = JSON.parse(out.trim().split("\n").pop()!) as { accounts: string[]; password: string };
  const cookies: string[] = [];
  for (const email of accounts) cookies.push(await signInCookie(base, email, password));
  return cookies;
}

async function findTargets(cookie: string) {
  const targets: { name: string; path: string }[] = [{ name: "trial overview page", path: "/trials/1" }];
  // The latest locked (or reviewed) analysis of the first demo trial, and its arm.
  const list = (await (await fetch(`${base}/api/trials/1/analyses`, { headers: { cookie } })).json()) as {
    analyses: { id: number; status: string }[];
  };
  const done = list.analyses.filter((a) => a.status === "locked" || a.status === "reviewed").at(-1);
  if (!done) throw new Error("the first demo trial has no locked analysis");
  const one = (await (await fetch(`${base}/api/trials/1/analyses/${done.id}`, { headers: { cookie } })).json()) as { arms: { id: number }[] };
  targets.push({ name: "closed review data", path: `/api/trials/1/analyses/${done.id}/review` });
  targets.push({ name: "interval question", path: `/api/trials/1/analyses/${done.id}/interval?arm=${one.arms[0].id}&lo=0.2&hi=0.4` });
  return targets;
}

/** A short unrecorded run first, so the figures describe a warmed-up server rather than its JIT. */
/** One cookie per client, in turn over the signed-in users: the clients are different people. */
function options(path: string, cookies: string[], duration: number): autocannon.Options {
  let next = 0;
  return {
    url: `${base}${path}`,
    connections,
    duration,
    headers: { cookie: cookies[0] },
    setupClient: (client) => client.setHeaders({ cookie: cookies[next++ % cookies.length] }),
    timeout: 10,
  };
}

async function warmUp(path: string, cookies: string[]) {
  await autocannon(options(path, cookies, WARM_UP_SECONDS));
}

/** One GET on a client's own keep-alive connection; resolves with the status. */
function get(agent: http.Agent, url: URL, cookie: string): Promise<number> {
  return new Promise((resolve, reject) => {
    const req = http.get(url, { agent, headers: { cookie }, timeout: 10_000 }, (res) => {
      res.resume();
      res.once("end", () => resolve(res.statusCode ?? 0));
    });
    req.once("timeout", () => req.destroy(new Error("timeout")));
    req.once("error", reject);
  });
}

/** Open-loop clients at `rate` questions a second each (Poisson), for `duration` s: latencies from each question's due time. */
async function paced(path: string, cookies: string[], duration: number) {
  const url = new URL(`${base}${path}`);
  const latencies: number[] = [];
  let errors = 0;
  const end = performance.now() + duration * 1000;
  const client = async (i: number) => {
    const agent = new http.Agent({ keepAlive: true, maxSockets: 1 });
    const cookie = cookies[i % cookies.length];
    let due = performance.now() + Math.random() * (1000 / rate);
    while (due < end) {
      const wait = due - performance.now();
      if (wait > 0) await new Promise((r) => setTimeout(r, wait));
      try {
        const status = await get(agent, url, cookie);
        if (status !== 200) errors++;
      } catch {
        errors++;
      }
      latencies.push(performance.now() - due);
      due += -Math.log(1 - Math.random()) * (1000 / rate);
    }
    agent.destroy();
  };
  await Promise.all(Array.from({ length: connections }, (_, i) => client(i)));
  return { latencies, errors };
}

/** One row of the report: exact percentiles over every latency. */
function summary(name: string, path: string, latencies: number[], errors: number) {
  latencies.sort((a, b) => a - b);
  return {
    route: name,
    path,
    requests: latencies.length,
    "req/s": Math.round(latencies.length / seconds),
    "p50 ms": percentile(latencies, 50).toFixed(1),
    "p95 ms": percentile(latencies, 95).toFixed(1),
    "p99 ms": percentile(latencies, 99).toFixed(1),
    errors,
  };
}

async function run(name: string, path: string, cookies: string[]) {
  if (rate > 0) {
    await paced(path, cookies, WARM_UP_SECONDS);
    const { latencies, errors } = await paced(path, cookies, seconds);
    return summary(name, path, latencies, errors);
  }
  await warmUp(path, cookies);
  const latencies: number[] = [];
  const statusCounts = new Map<number, number>();
  const result = await new Promise<autocannon.Result>((resolve, reject) => {
    const instance = autocannon(options(path, cookies, seconds), (err, res) => (err ? reject(err) : resolve(res)));
    instance.on("response", (_client, statusCode, _bytes, responseTime) => {
      latencies.push(responseTime);
      statusCounts.set(statusCode, (statusCounts.get(statusCode) ?? 0) + 1);
    });
  });
  const non2xx = [...statusCounts].filter(([s]) => s < 200 || s >= 300).reduce((s, [, n]) => s + n, 0);
  return summary(name, path, latencies, result.errors + result.timeouts + non2xx);
}

const cookie = await signInCookie(base, "dmc@cairn.example", "demo-dmc-pass");
const targets = await findTargets(cookie);
const cookies = users > 1 ? await reviewerCookies(users) : [cookie];
let calibration: Promise<unknown> | null = null;
let loadFinished = false;
if (duringCalibration) {
  // A 40 x 40 grid of (thetaT, thetaL) on the trial's locked design, started before the load and polled until done.
  const statCookie = await signInCookie(base, "statistician@cairn.example", "demo-stat-pass");
  const designs = (await (await fetch(`${base}/api/trials/1/designs`, { headers: { cookie: statCookie } })).json()) as { designs: { status: string; spec: unknown }[] };
  const locked = designs.designs.find((d) => d.status === "locked")?.spec as Record<string, unknown>;
  // Heavier than the demo design: Nmax 100 with continuous monitoring from patient 10.
  const spec = { ...locked, nMax: 100, looks: { kind: "every", first: 10, every: 1 } };
  const startOne = () => fetch(`${base}/api/trials/1/calibrations`, {
    method: "POST",
    headers: { cookie: statCookie, "content-type": "application/json" },
    body: JSON.stringify({
      spec,
      typeIErrorLimit: 0.1,
      powerTarget: 0.8,
      thetaT: { from: 0.8, to: 0.995, step: 0.005 },
      thetaL: { from: 0.005, to: 0.2, step: 0.005 },
      thetaU: null,
    }),
  });
  // Calibrations back to back for as long as the load runs, so the server is never without one.
  calibration = (async () => {
    let runs = 0;
    let designsEvaluated = 0;
    const t0 = Date.now();
    while (!loadFinished) {
      const res = await startOne();
      const { job } = (await res.json()) as { job?: { id: string } };
      if (!job) throw new Error(`calibration refused: HTTP ${res.status}`);
      for (;;) {
        const r = (await (await fetch(`${base}/api/trials/1/calibrations/${job.id}`, { headers: { cookie: statCookie } })).json()) as { job: { status: string; evaluated: number } };
        if (r.job.status !== "running") {
          runs++;
          designsEvaluated += r.job.evaluated;
          break;
        }
        await new Promise((done) => setTimeout(done, 200));
      }
    }
    console.log(`${runs} calibrations (40 x 40, Nmax 100, continuous) ran during the load: ${designsEvaluated} designs in ${((Date.now() - t0) / 1000).toFixed(0)} s`);
  })();
}
const rows = [];
for (const t of targets.filter((t) => t.name.includes(only))) rows.push(await run(t.name, t.path, cookies));
loadFinished = true;
await calibration;
console.log(
  `\nLoad test ${new Date().toISOString()} · ${connections} clients as ${cookies.length} different user${cookies.length === 1 ? "" : "s"} · ${rate > 0 ? `${rate} questions/s per client on average (independent Poisson streams)` : "back to back (saturation)"} · ${seconds} s per route after a ${WARM_UP_SECONDS} s warm-up${duringCalibration ? " · during a calibration" : ""}`,
);
console.table(rows);

/** Resident memory of the web processes `scripts/up` started (its launcher's children), if this is that server. */
function webProcessMemory(): string | null {
  const pidFile = path.join(process.env.CAIRN_RUN_DIR ?? path.resolve(import.meta.dirname, "../.run"), "web.pid");
  const host = new URL(base).hostname;
  if (!existsSync(pidFile) || !["localhost", "127.0.0.1", "::1"].includes(host)) return null;
  try {
    const children = (pid: string): string[] => {
      try {
        return execFileSync("pgrep", ["-P", pid]).toString().trim().split("\n").filter(Boolean);
      } catch {
        return [];
      }
    };
    // The pid file names the launcher's wrapper; the web processes are the leaves below it.
    const leaves = (pid: string): string[] => {
      const c = children(pid);
      return c.length ? c.flatMap(leaves) : [pid];
    };
    const workers = leaves(readFileSync(pidFile, "utf8").trim());
    const mb = workers.map((pid) => {
      const kb = Number(/VmRSS:\s+(\d+)/.exec(readFileSync(`/proc/${pid}/status`, "utf8"))?.[1]);
      return `${pid}: ${Math.round(kb / 1024)} MB`;
    });
    return mb.length ? mb.join(", ") : null;
  } catch {
    return null;
  }
}
const memory = webProcessMemory();
if (memory) console.log(`Web processes' resident memory after the run: ${memory}`);
