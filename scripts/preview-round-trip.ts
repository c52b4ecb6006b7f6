/**
 * Round trip of the design-preview route on loopback: a running production server (scripts/up, or
 * `node scripts/serve.mjs` on a seeded database), signed in as the demo statistician.
 *   npx tsx scripts/preview-round-trip.ts [--base http://localhost:3000] [--runs 41] [--trial 1]
 * Posts a single-arm design, Nmax 200 with a look at every patient from 10 (boundaries, operating
 * characteristics at p0 and p1, the 51-rate curve), one request at a time; each request changes
 * thetaT in the 9th decimal place so the server's preview cache never answers. Prints the median
 * and the spread of the round trips and of the server's own compute time (computeMs).
 * A measurement, not a test: the target (under 30 ms) is checked by reading its output.
 */
import { signInCookie } from "../tests/support/http-session";

function arg(name: string, fallback: string): string {
  const i = process.argv.indexOf(`--${name}`);
  return i >= 0 && process.argv[i + 1] ? process.argv[i + 1] : fallback;
}
const base = arg("base", "http://localhost:3000");
const runs = Number(arg("runs", "41"));

const spec = (i: number) => ({
  arms: "single",
  prior: { family: "beta", a: 0.6, b: 0.4 },
  p0: 0.2,
  p1: 0.4,
  delta: 0,
  nMax: 200,
  looks: { kind: "every", first: 10, every: 1 },
  rule: { kind: "predictive", thetaT: 0.95 + i * 1e-9, futilityThreshold: 0.05, efficacyStopping: true, efficacyThreshold: 0.99 },
  safety: null,
});

/** The demo's first trial (CRN-201) is the single-arm one. */
const trial = { id: Number(arg("trial", "1")) };
const cookie = await signInCookie(base, "statistician@cairn.example", "demo-stat-pass");

const roundTrips: number[] = [];
const compute: number[] = [];
for (let i = 0; i <= runs; i++) {
  const t0 = performance.now();
  const res = await fetch(`${base}/api/trials/${trial.id}/design-preview`, {
    method: "POST",
    headers: { cookie, "content-type": "application/json" },
    body: JSON.stringify({ spec: spec(i) }),
  });
  const body = (await res.json()) as { computeMs?: number };
  const ms = performance.now() - t0;
  if (res.status !== 200) throw new Error(`design preview answered ${res.status}: ${JSON.stringify(body)}`);
  if (i === 0) continue; // the first request warms the route and the worker thread
  roundTrips.push(ms);
  compute.push(body.computeMs ?? NaN);
}
const q = (xs: number[], p: number) => [...xs].sort((a, b) => a - b)[Math.min(xs.length - 1, Math.floor(p * xs.length))];
console.log(`design preview, single arm, Nmax 200, every patient: ${runs} requests`);
console.log(`round trip ms: median ${q(roundTrips, 0.5).toFixed(1)}, p10 ${q(roundTrips, 0.1).toFixed(1)}, p90 ${q(roundTrips, 0.9).toFixed(1)} (target: median under 30)`);
console.log(`server compute ms (computeMs): median ${q(compute, 0.5)}, p90 ${q(compute, 0.9)}`);
