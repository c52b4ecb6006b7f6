import { describe, expect, it } from "vitest";
import { DEFAULT_RETURN_TO, safeReturnTo, signInPathFor, signInPathForPage } from "./return-to";

describe("safeReturnTo", () => {
  it("keeps same-site paths with their query and fragment", () => {
    expect(safeReturnTo("/trials/3/meetings/7")).toBe("/trials/3/meetings/7");
    expect(safeReturnTo("/trials/3/meetings/7#packets")).toBe("/trials/3/meetings/7#packets");
    expect(safeReturnTo("/trials/3/review/9?tab=closed")).toBe("/trials/3/review/9?tab=closed");
    expect(safeReturnTo("/admin")).toBe("/admin");
  });

  // The usual open-redirect tricks (OWASP "Unvalidated Redirects and Forwards" cheat sheet lists the
  // protocol-relative and backslash forms; the tab form follows the WHATWG URL parser, which strips
  // tabs and newlines). Each must be refused, never turned into another host.
  it.each([
    ["protocol-relative", "//evil.example"],
    ["protocol-relative with path", "//evil.example/trials"],
    ["backslash host", "/\\evil.example"],
    ["double backslash", "\\\\evil.example"],
    ["mixed slashes", "/\\/evil.example"],
    ["dot segment collapsing to a protocol-relative path", "/.//evil.example"],
    ["dot-dot segment collapsing to a protocol-relative path", "/a/..//evil.example"],
    ["absolute https", "https://evil.example/"],
    ["absolute http", "http://localhost:3000/trials"],
    ["scheme without slashes", "https:evil.example"],
    ["javascript", "javascript:alert(1)"],
    ["data", "data:text/html,<script>alert(1)</script>"],
    ["tab between slashes", "/\t/evil.example"],
    ["newline between slashes", "/\n/evil.example"],
    ["leading space", " /trials"],
    ["relative without slash", "trials/3"],
    ["empty", ""],
    ["encoded slashes as the start", "%2F%2Fevil.example"],
    ["sign-in loop", "/signin?callbackUrl=/trials"],
    ["API route", "/api/trials/1/open-status"],
    ["too long", "/" + "a".repeat(2000)],
  ])("refuses %s", (_name, raw) => {
    expect(safeReturnTo(raw)).toBeNull();
  });

  it("refuses what is not a string", () => {
    for (const v of [undefined, null, 42, ["/trials"], { toString: () => "/trials" }]) expect(safeReturnTo(v)).toBeNull();
  });

  it("keeps percent-encoded slashes encoded, so the target stays a path on this site", () => {
    const out = safeReturnTo("/%2F%2Fevil.example");
    expect(out).toBe("/%2F%2Fevil.example");
    expect(new URL(out!, "https://cairn.test").host).toBe("cairn.test");
  });

  it("never yields a value that a browser would resolve to another host", () => {
    // Brute force over short strings made of the characters that matter for the host part.
    const alphabet = ["/", "\\", ".", ":", "e", "%", "@", "?", "#", "\t"];
    let checked = 0;
    const walk = (prefix: string, depth: number) => {
      if (depth === 0) return;
      for (const c of alphabet) {
        const s = prefix + c;
        const out = safeReturnTo(s);
        if (out !== null) expect(new URL(out, "https://cairn.test/trials/1").origin).toBe("https://cairn.test");
        checked++;
        walk(s, depth - 1);
      }
    };
    walk("", 5);
    expect(checked).toBeGreaterThan(100_000);
  });
});

describe("signInPathFor", () => {
  it("carries the target, encoded, and leaves the parameter out for the default landing page", () => {
    expect(signInPathFor("/trials/3/meetings/7?x=1")).toBe("/signin?callbackUrl=%2Ftrials%2F3%2Fmeetings%2F7%3Fx%3D1");
    expect(signInPathFor(DEFAULT_RETURN_TO)).toBe("/signin");
    expect(signInPathFor("/")).toBe("/signin");
    expect(signInPathFor("//evil.example")).toBe("/signin");
  });
});

describe("signInPathForPage", () => {
  it("returns to the page the proxy named, decoded back to the same path by URLSearchParams", () => {
    const path = signInPathForPage("/trials/3/meetings/7/closed-session?tab=votes");
    const back = new URL(path, "https://cairn.test").searchParams.get("callbackUrl");
    expect(back).toBe("/trials/3/meetings/7/closed-session?tab=votes");
  });

  it("falls back to plain sign-in without a header, for the landing page and for an unsafe value", () => {
    expect(signInPathForPage(null)).toBe("/signin");
    expect(signInPathForPage(undefined)).toBe("/signin");
    expect(signInPathForPage("")).toBe("/signin");
    expect(signInPathForPage(DEFAULT_RETURN_TO)).toBe("/signin");
    expect(signInPathForPage("//evil.example/trials")).toBe("/signin");
    expect(signInPathForPage("https://evil.example/")).toBe("/signin");
    expect(signInPathForPage("/signin?callbackUrl=%2Ftrials")).toBe("/signin");
  });
});
