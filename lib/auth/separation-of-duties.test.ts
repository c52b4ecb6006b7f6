import { describe, expect, it } from "vitest";
import { roleGrantRefusal } from "./separation-of-duties";

// The rule restated from the task's finding 6 (not from the code): no self-unblinding; sponsor or
// coordinator never together with an unblinded role on one trial, in either order.
describe("separation of duties for trial roles", () => {
  it("an administrator cannot unblind themselves, but may give themselves a blinded role", () => {
    expect(roleGrantRefusal(1, 1, "unblinded_statistician", [])).toMatch(/second administrator/);
    expect(roleGrantRefusal(1, 1, "dmc_member", [])).toMatch(/second administrator/);
    expect(roleGrantRefusal(1, 1, "sponsor", [])).toBeNull();
    expect(roleGrantRefusal(1, 2, "dmc_member", [])).toBeNull();
  });
  it.each([
    ["sponsor", "dmc_member"],
    ["sponsor", "unblinded_statistician"],
    ["coordinator", "dmc_member"],
    ["coordinator", "unblinded_statistician"],
  ] as const)("%s and %s on one trial are refused in both orders", (blinded, unblinded) => {
    expect(roleGrantRefusal(1, 2, unblinded, [blinded])).toMatch(/blinded and unblinded sides/);
    expect(roleGrantRefusal(1, 2, blinded, [unblinded])).toMatch(/blinded and unblinded sides/);
  });
  it("roles on the same side combine", () => {
    expect(roleGrantRefusal(1, 2, "coordinator", ["sponsor"])).toBeNull();
    expect(roleGrantRefusal(1, 2, "dmc_member", ["unblinded_statistician"])).toBeNull();
  });
});
