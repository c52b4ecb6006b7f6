/**
 * Load test against a running production server on loopback (autocannon).
 *   npx tsx scripts/load-test.ts [--base http://localhost:3000] [--seconds 60] [--connections 50] [--during-calibration]
 * Signs in as the demo DMC member, then for each target route runs `connections` concurrent
 * keep-alive clients for `seconds` and prints requests/s, p50/p95/p99 latency (exact, from every
 * response time) and errors. With --during-calibration a 40 x 40 calibration runs on the server at
 * the same time, to show that CPU-heavy work stays off the request path.
 */
import autocannon from "autocannon";
import { signInCookie } from "../tests/support/http-session";

function arg(name: string, fallback: string): string {
  const i = process.argv.indexOf(`--${name}`);
  return i >= 0 && process.argv[i + 1] && !process.argv[i + 1].startsWith("--") ? process.argv[i + 1] : fallback;
}
const base = arg("base", "http://localhost:3000");
const seconds = Number(arg("seconds", "60"));
const connections = Number(arg("connections", "50"));
const duringCalibration = process.argv.includes("--during-calibration");

function percentile(sorted: number[], p: number): number {
  if (!sorted.length) return NaN;
  const i = Math.min(sorted.length - 1, Math.max(0, Math.ceil((p / 100) * sorted.length) - 1));
  return sorted[i];
}

async function findTargets(cookie: string) {
  const trials = [1, 2];
  const targets: { name: string; path: string }[] = [{ name: "trial overview page", path: `/trials/${trials[0]}` }];
  // The latest locked analysis of the first demo trial.
  const open = (await (await fetch(`${base}/api/trials/1/open-status`, { headers: { cookie } })).json()) as {
    looks: { lookNumber: number; status: string }[];
  };
  const list = (await (await fetch(`${base}/api/trials/1/analyses`, { headers: { cookie } })).json().catch(() => null)) as
    | { analyses?: { id: number; status: string }[] }
    | null;
  const locked = list?.analyses?.filter((a) => a.status === "locked" || a.status === "reviewed").at(-1);
  const analysisId = locked?.id ?? open.looks.filter((l) => l.status !== "planned").length;
  targets.push({ name: "closed review data", path: `/api/trials/1/analyses/${analysisId}/review` });
  targets.push({ name: "interval question", path: `/api/trials/1/analyses/${analysisId}/interval?lo=0.2&hi=0.4` });
  return targets;
}

async function run(name: string, path: string, cookie: string) {
  const latencies: number[] = [];
  const statusCounts = new Map<number, number>();
  const result = await new Promise<autocannon.Result>((resolve, reject) => {
    const instance = autocannon({ url: `${base}${path}`, connections, duration: seconds, headers: { cookie }, timeout: 10 }, (err, res) =>
      err ? reject(err) : resolve(res),
    );
    instance.on("response", (_client, statusCode, _bytes, responseTime) => {
      latencies.push(responseTime);
      statusCounts.set(statusCode, (statusCounts.get(statusCode) ?? 0) + 1);
    });
  });
  latencies.sort((a, b) => a - b);
  const non2xx = [...statusCounts].filter(([s]) => s < 200 || s >= 300).reduce((s, [, n]) => s + n, 0);
  return {
    route: name,
    path,
    requests: latencies.length,
    "req/s": Math.round(latencies.length / seconds),
    "p50 ms": percentile(latencies, 50).toFixed(1),
    "p95 ms": percentile(latencies, 95).toFixed(1),
    "p99 ms": percentile(latencies, 99).toFixed(1),
    errors: result.errors + result.timeouts + non2xx,
  };
}

const cookie = await signInCookie(base, "dmc@cairn.example", "demo-dmc-pass");
const targets = await findTargets(cookie);
let calibration: Promise<unknown> | null = null;
if (duringCalibration) {
  const statCookie = await signInCookie(base, "statistician@cairn.example", "demo-stat-pass");
  const res = await fetch(`${base}/api/trials/1/calibrations`, {
    method: "POST",
    headers: { cookie: statCookie, "content-type": "application/json" },
    body: JSON.stringify({ typeIErrorLimit: 0.1, powerTarget: 0.8, gridSize: 40 }),
  });
  console.log(`calibration started: HTTP ${res.status}`);
  calibration = Promise.resolve();
}
const rows = [];
for (const t of targets) rows.push(await run(t.name, t.path, cookie));
await calibration;
console.log(`\nLoad test ${new Date().toISOString()} · ${connections} connections · ${seconds} s per route${duringCalibration ? " · during a calibration" : ""}`);
console.table(rows);
