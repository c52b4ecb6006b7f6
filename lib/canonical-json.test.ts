import { describe, expect, it } from "vitest";
import { canonicalJson } from "./canonical-json";

describe("canonicalJson", () => {
  it("equals JSON.parse-compatible text with keys in code-unit order at every depth", () => {
    const v = { b: [3, { z: 1, a: "x" }], a: null, c: "é" };
    const text = canonicalJson(v);
    expect(text).toBe('{"a":null,"b":[3,{"a":"x","z":1}],"c":"é"}');
    // Exact identity: parsing the canonical text gives back the same value.
    expect(JSON.parse(text)).toEqual(v);
  });
  it("gives the same text whatever the insertion order of keys", () => {
    expect(canonicalJson({ x: 1, y: { p: 1, q: 2 } })).toBe(canonicalJson({ y: { q: 2, p: 1 }, x: 1 }));
  });
  it("drops undefined members, writes dates as ISO text and non-finite numbers as null, as JSON.stringify does", () => {
    const d = new Date(Date.UTC(2026, 11, 4, 9, 30));
    const v = { when: d, gone: undefined, inf: Infinity, nan: NaN, n: 0.1 };
    expect(canonicalJson(v)).toBe('{"inf":null,"n":0.1,"nan":null,"when":"2026-12-04T09:30:00.000Z"}');
    expect(JSON.parse(canonicalJson(v))).toEqual(JSON.parse(JSON.stringify(v)));
  });
});
