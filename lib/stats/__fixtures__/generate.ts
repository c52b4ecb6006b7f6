/**
 * Writes the reference fixtures that distributions.test.ts compares lib/stats/distributions.ts with.
 * Reference implementation: stdlib-js (npm packages named in each fixture, versions read from their
 * package.json). Inputs are drawn with @stdlib/random-base-mt19937 from a fixed seed, so a rerun
 * reproduces the files exactly. Run: npx tsx lib/stats/__fixtures__/generate.ts
 */
import { readFileSync, writeFileSync } from "node:fs";
import { createRequire } from "node:module";
import path from "node:path";
import { fileURLToPath } from "node:url";
import betaCdf from "@stdlib/stats-base-dists-beta-cdf";
import betaPdf from "@stdlib/stats-base-dists-beta-pdf";
import betaQuantile from "@stdlib/stats-base-dists-beta-quantile";
import betaln from "@stdlib/math-base-special-betaln";
import binomialPmf from "@stdlib/stats-base-dists-binomial-pmf";
import mt19937 from "@stdlib/random-base-mt19937";

const here = path.dirname(fileURLToPath(import.meta.url));
const require = createRequire(import.meta.url);
const SEED = 20240611;

function version(pkg: string): string {
  const file = require.resolve(`${pkg}/package.json`);
  return JSON.parse(readFileSync(file, "utf8")).version as string;
}

const rng = (mt19937.factory({ seed: SEED }) as unknown as { normalized: () => number }).normalized;
const logUniform = (lo: number, hi: number) => Math.exp(Math.log(lo) + rng() * (Math.log(hi) - Math.log(lo)));

/** Shapes in named ranges, so the test can state a tolerance per range. */
function shapes(range: string): [number, number] {
  switch (range) {
    case "moderate": // typical trial posteriors
      return [0.5 + rng() * 60, 0.5 + rng() * 60];
    case "small": // Jeffreys-type and U/J-shaped
      return [logUniform(0.05, 1), logUniform(0.05, 3)];
    case "large": // long trials, informative priors
      return [logUniform(50, 5000), logUniform(50, 5000)];
    case "skewed": // e.g. a = 0.05, b = 2000: a rare event
      return rng() < 0.5 ? [logUniform(0.05, 2), logUniform(500, 5000)] : [logUniform(500, 5000), logUniform(0.05, 2)];
    default:
      throw new Error(range);
  }
}

/** Rates spread over the bulk and both tails of the distribution (quantile levels from 1e-12 to 1 - 1e-12). */
function rateFor(a: number, b: number): number {
  const u = rng();
  const level = u < 0.2 ? logUniform(1e-12, 1e-3) : u < 0.4 ? 1 - logUniform(1e-12, 1e-3) : rng();
  const p = betaQuantile(level, a, b);
  return p > 0 && p < 1 ? p : rng();
}

const RANGES = ["moderate", "small", "large", "skewed"] as const;
const PER_RANGE = 150;

type Row = Record<string, number | string>;
const cdfRows: Row[] = [];
const pdfRows: Row[] = [];
const quantileRows: Row[] = [];
const betaBinomialRows: Row[] = [];
const betalnRows: Row[] = [];
const binomialRows: Row[] = [];

for (const range of RANGES) {
  for (let i = 0; i < PER_RANGE; i++) {
    const [a, b] = shapes(range);
    const p = rateFor(a, b);
    cdfRows.push({ range, a, b, p, expected: betaCdf(p, a, b) });
    pdfRows.push({ range, a, b, p, expected: betaPdf(p, a, b) });
    const q = rng() < 0.3 ? logUniform(1e-10, 1e-2) : rng();
    quantileRows.push({ range, a, b, q, expected: betaQuantile(q, a, b) });
    betalnRows.push({ range, a, b, expected: betaln(a, b) });
  }
}
for (let i = 0; i < 200; i++) {
  const m = Math.floor(rng() * 200);
  const k = Math.floor(rng() * (m + 1));
  const [a, b] = i % 2 ? shapes("moderate") : shapes("small");
  // BetaBinomial(m, a, b) pmf = C(m, k) B(a + k, b + m - k) / B(a, b), with C(m, k) = 1 / ((m + 1) B(k + 1, m - k + 1)).
  const logPmf = -Math.log(m + 1) - betaln(k + 1, m - k + 1) + betaln(a + k, b + m - k) - betaln(a, b);
  betaBinomialRows.push({ m, k, a, b, expected: logPmf });
  const p = rng();
  binomialRows.push({ m, k, p, expected: binomialPmf(k, m, p) });
}

function write(name: string, library: string, description: string, rows: Row[]) {
  const body = { library, version: version(library), seed: SEED, prng: `@stdlib/random-base-mt19937@${version("@stdlib/random-base-mt19937")}`, description, rows };
  writeFileSync(path.join(here, name), JSON.stringify(body, null, 1) + "\n");
}
write("beta-cdf.json", "@stdlib/stats-base-dists-beta-cdf", "P(X <= p), X ~ Beta(a, b)", cdfRows);
write("beta-pdf.json", "@stdlib/stats-base-dists-beta-pdf", "Beta(a, b) density at p", pdfRows);
write("beta-quantile.json", "@stdlib/stats-base-dists-beta-quantile", "Beta(a, b) quantile at q", quantileRows);
write("betaln.json", "@stdlib/math-base-special-betaln", "ln B(a, b)", betalnRows);
write("beta-binomial-logpmf.json", "@stdlib/math-base-special-betaln", "ln P(Y = k), Y ~ BetaBinomial(m, a, b), from stdlib betaln", betaBinomialRows);
write("binomial-pmf.json", "@stdlib/stats-base-dists-binomial-pmf", "P(Y = k), Y ~ Binomial(m, p)", binomialRows);
console.log("fixtures written to", here);
