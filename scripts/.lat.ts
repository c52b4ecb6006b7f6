import { signInCookie } from "/work/main/tests/support/http-session";
const base = "http://localhost:3000";
const cookie = await signInCookie(base, "dmc@cairn.example", "demo-dmc-pass");
for (const path of ["/api/health", "/api/trials/1/open-status", "/api/trials/1/analyses/2/interval?arm=1&lo=0.2&hi=0.4", "/api/trials/1/analyses/2/review"]) {
  const t: number[] = [];
  for (let i = 0; i < 200; i++) { const t0 = performance.now(); const r = await fetch(base + path, { headers: { cookie } }); await r.text(); t.push(performance.now() - t0); }
  t.sort((a, b) => a - b);
  console.log(path, "median", t[100].toFixed(2), "p95", t[190].toFixed(2));
}
