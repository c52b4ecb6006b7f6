import { describe, expect, it } from "vitest";
import { reasonSchema, rowVersionSchema, signingPasswordSchema } from "./schema-pieces";

describe("rowVersionSchema", () => {
  it("reads a number or a string of digits", () => {
    expect(rowVersionSchema.parse(3)).toBe(3);
    expect(rowVersionSchema.parse("12")).toBe(12);
    expect(rowVersionSchema.parse(" 7 ")).toBe(7);
  });
  it("refuses what a loose coercion would accept", () => {
    for (const bad of [true, "1e3", "0x10", "", null, undefined, 0, -1, 1.5, "3.0", 2_147_483_648, [4]]) {
      expect(rowVersionSchema.safeParse(bad).success, JSON.stringify(bad)).toBe(false);
    }
  });
});

describe("signingPasswordSchema and reasonSchema", () => {
  it("asks for the password to sign, and bounds its length", () => {
    expect(signingPasswordSchema.safeParse("").error?.issues[0].message).toBe("Enter your password to sign.");
    expect(signingPasswordSchema.safeParse("x".repeat(201)).success).toBe(false);
    expect(signingPasswordSchema.parse("a b")).toBe("a b");
  });
  it("trims a reason and names what it is for", () => {
    const s = reasonSchema("the amendment");
    expect(s.parse("  a real reason here  ")).toBe("a real reason here");
    expect(s.safeParse("too short").error?.issues[0].message).toBe("Give the reason for the amendment (at least 10 characters).");
  });
});
