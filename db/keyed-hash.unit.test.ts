import { describe, expect, it } from "vitest";
import { createHash } from "node:crypto";
import { auditKey, hashByScheme, hmacSha256Hex, keyedHash } from "./keyed-hash";

describe("keyed hashes", () => {
  // RFC 4231 (HMAC-SHA256 test vectors), section 4.3, test case 2. Value recalled from memory and
  // confirmed by this test passing against node:crypto.
  it("HMAC-SHA256 matches RFC 4231 test case 2", () => {
    expect(hmacSha256Hex("Jefe", "what do ya want for nothing?")).toBe("5bdcc146bf60754e6a042426089575c75a003f089d2739839dec58b964ec3843");
  });

  it("a keyed hash depends on the key and on the purpose, and differs from the plain SHA-256", () => {
    const k1 = "k".repeat(32);
    const k2 = "j".repeat(32);
    const text = '{"enrolled":14,"evaluable":13}';
    expect(keyedHash("audit-row", text, k1)).not.toBe(keyedHash("audit-row", text, k2));
    expect(keyedHash("audit-row", text, k1)).not.toBe(keyedHash("signature-record", text, k1));
    expect(keyedHash("audit-row", text, k1)).not.toBe(createHash("sha256").update(text).digest("hex"));
  });

  it("legacy rows are recomputed as plain SHA-256 (FIPS 180-4 'abc' example); unknown schemes are refused", () => {
    // The SHA-256 of "abc" is the worked example of FIPS 180-4 / NIST's example values.
    expect(hashByScheme("sha256", "audit-row", "abc")).toBe("ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
    expect(() => hashByScheme("md5", "audit-row", "abc", "k".repeat(32))).toThrow(/unknown hash scheme/);
  });

  it("a missing or short key is refused instead of falling back to an unkeyed hash", () => {
    expect(() => auditKey({})).toThrow(/CAIRN_AUDIT_KEY/);
    expect(() => auditKey({ CAIRN_AUDIT_KEY: "short" })).toThrow(/CAIRN_AUDIT_KEY/);
    expect(auditKey({ CAIRN_AUDIT_KEY: "x".repeat(40) })).toHaveLength(40);
  });
});
