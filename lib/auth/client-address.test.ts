import { describe, expect, it } from "vitest";
import { clientAddress, PEER_HEADER, UNKNOWN_ADDRESS } from "./client-address";

describe("clientAddress", () => {
  it("an attacker cannot pick a fresh throttling address with X-Forwarded-For when no trusted proxy is configured", () => {
    const h = new Headers({ "x-forwarded-for": "203.0.113.99", [PEER_HEADER]: "198.51.100.7" });
    expect(clientAddress(h, false)).toBe("198.51.100.7");
    expect(clientAddress({ "x-forwarded-for": "203.0.113.99", [PEER_HEADER]: "198.51.100.7" }, false)).toBe("198.51.100.7");
  });

  it("behind a trusted proxy, takes the entry the proxy appended (the last), not what the client wrote before it", () => {
    const h = new Headers({ "x-forwarded-for": "203.0.113.99, 192.0.2.44", [PEER_HEADER]: "10.0.0.2" });
    expect(clientAddress(h, true)).toBe("192.0.2.44");
  });

  it("falls back to the peer address, then to one shared bucket, and cuts absurdly long values", () => {
    expect(clientAddress(new Headers({ [PEER_HEADER]: "198.51.100.7" }), true)).toBe("198.51.100.7");
    expect(clientAddress(new Headers(), false)).toBe(UNKNOWN_ADDRESS);
    expect(clientAddress(undefined, false)).toBe(UNKNOWN_ADDRESS);
    expect(clientAddress(new Headers({ [PEER_HEADER]: "x".repeat(500) }), false)).toHaveLength(100);
  });
});
