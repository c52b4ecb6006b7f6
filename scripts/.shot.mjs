import { chromium } from "@playwright/test";
const [,, who, pw, ...urls] = process.argv;
const b = await chromium.launch({ executablePath: "/usr/bin/chromium", args: ["--no-sandbox","--disable-gpu","--disable-background-networking"] });
const p = await b.newPage({ viewport: { width: 1280, height: 900 } });
await p.goto("http://localhost:3000/signin");
await p.getByLabel("E-mail").fill(who); await p.getByLabel("Password").fill(pw);
await p.getByRole("button", { name: "Sign in" }).click();
await p.waitForURL(/trials/);
let i = 0;
for (const u of urls) { const r = await p.goto("http://localhost:3000" + u); await p.waitForTimeout(1500); await p.screenshot({ path: `/tmp/shots/${i++}.png`, fullPage: true }); console.log(u, r.status()); }
await b.close();
