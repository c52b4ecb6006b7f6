import { readFileSync } from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { API_CONTENT_SECURITY_POLICY, newCspNonce, pageContentSecurityPolicy } from "./security-headers";

const directive = (csp: string, name: string) => csp.split("; ").find((d) => d.startsWith(`${name} `)) ?? "";

describe("an injected inline script (nonce CSP)", () => {
  it("allows scripts only by this answer's nonce: no 'unsafe-inline', no 'unsafe-eval' outside development", () => {
    const nonce = newCspNonce();
    const prod = pageContentSecurityPolicy(nonce, { dev: false });
    expect(directive(prod, "script-src")).toBe(`script-src 'self' 'nonce-${nonce}' 'strict-dynamic'`);
    expect(directive(pageContentSecurityPolicy(nonce, { dev: true }), "script-src")).toContain("'unsafe-eval'");
    expect(prod).toContain("object-src 'none'");
    expect(prod).toContain("base-uri 'self'");
    expect(prod).toContain("frame-ancestors 'none'");
  });

  it("nonces carry 128 random bits and do not repeat (10,000 draws)", () => {
    const seen = new Set<string>();
    for (let i = 0; i < 10_000; i++) {
      const n = newCspNonce();
      expect(Buffer.from(n, "base64").length).toBe(16);
      seen.add(n);
    }
    expect(seen.size).toBe(10_000);
  });

  it("refuses a nonce that could break out of the header value", () => {
    expect(() => pageContentSecurityPolicy("abc'; script-src *", { dev: false })).toThrow();
    expect(() => pageContentSecurityPolicy("short", { dev: false })).toThrow();
  });

  it("the API policy lets nothing load, and next.config.mjs serves the same value", () => {
    expect(API_CONTENT_SECURITY_POLICY).toMatch(/^default-src 'none';/);
    const config = readFileSync(path.resolve(import.meta.dirname, "../next.config.mjs"), "utf8");
    expect(config).toContain(`const apiCsp = "${API_CONTENT_SECURITY_POLICY}"`);
  });
});
