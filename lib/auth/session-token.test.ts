import { afterEach, describe, expect, it, vi } from "vitest";
import { encode } from "next-auth/jwt";
import { decodeSessionToken, readSessionToken, rememberedTokenCount } from "./session-token";

const secret = "test-secret-for-session-token-cache";

function requestWith(token: string) {
  return { headers: new Headers(), cookies: { "next-auth.session-token": token } } as unknown as Parameters<typeof readSessionToken>[0];
}

afterEach(() => {
  vi.useRealTimers();
});

describe("decodeSessionToken", () => {
  it("decrypts a genuine token (next-auth's own encode) and remembers it", async () => {
    const token = await encode({ token: { uid: 7, email: "someone@test.example" }, secret, maxAge: 60 });
    const before = rememberedTokenCount();
    expect((await decodeSessionToken({ token, secret }))?.uid).toBe(7);
    expect(rememberedTokenCount()).toBe(before + 1);
    expect((await decodeSessionToken({ token, secret }))?.uid).toBe(7);
    expect(rememberedTokenCount()).toBe(before + 1);
  });

  it("refuses a tampered token and a token under another secret, and remembers neither", async () => {
    const token = await encode({ token: { uid: 8 }, secret, maxAge: 60 });
    const tampered = token.slice(0, -6) + (token.endsWith("AAAAAA") ? "BBBBBB" : "AAAAAA");
    const before = rememberedTokenCount();
    await expect(decodeSessionToken({ token: tampered, secret })).rejects.toThrow();
    await expect(decodeSessionToken({ token, secret: "another-secret-entirely" })).rejects.toThrow();
    expect(rememberedTokenCount()).toBe(before);
  });

  it("stops accepting a remembered token once it has expired", async () => {
    vi.useFakeTimers({ toFake: ["Date"] });
    vi.setSystemTime(new Date("2026-06-01T12:00:00Z"));
    const token = await encode({ token: { uid: 9 }, secret, maxAge: 60 });
    expect((await decodeSessionToken({ token, secret }))?.uid).toBe(9);
    // Past expiry and past jose's 15 s clock tolerance: the cache must not answer for it.
    vi.setSystemTime(new Date("2026-06-01T12:01:30Z"));
    await expect(decodeSessionToken({ token, secret })).rejects.toThrow();
  });
});

describe("readSessionToken", () => {
  it("reads the session cookie, and answers null for a missing or tampered one", async () => {
    process.env.NEXTAUTH_SECRET = secret;
    const token = await encode({ token: { uid: 11 }, secret, maxAge: 60 });
    expect((await readSessionToken(requestWith(token)))?.uid).toBe(11);
    expect(await readSessionToken(requestWith(token.slice(0, -4) + "abcd"))).toBeNull();
    expect(await readSessionToken({ headers: new Headers(), cookies: {} } as unknown as Parameters<typeof readSessionToken>[0])).toBeNull();
  });
});
