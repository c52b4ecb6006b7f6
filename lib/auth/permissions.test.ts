import { describe, expect, it } from "vitest";
import { allows, isUnblinded } from "./permissions";

// The brief: "least privilege: being admin does not unblind".
describe("permission matrix", () => {
  it("an administrator with no trial role is blinded", () => {
    expect(isUnblinded({ isAdmin: true, roles: [] })).toBe(false);
    expect(allows({ isAdmin: true, roles: [] }, "viewClosed")).toBe(false);
  });
  it("an administrator who is also unblinded statistician on the trial is unblinded there", () => {
    expect(isUnblinded({ isAdmin: true, roles: ["unblinded_statistician"] })).toBe(true);
  });
  it("sponsor and coordinator never see closed results", () => {
    expect(allows({ isAdmin: false, roles: ["sponsor"] }, "viewClosed")).toBe(false);
    expect(allows({ isAdmin: false, roles: ["coordinator"] }, "viewClosed")).toBe(false);
    expect(allows({ isAdmin: false, roles: ["sponsor", "coordinator"] }, "viewAuditClosed")).toBe(false);
  });
  it("only a DMC member records a recommendation; only the statistician locks a design", () => {
    expect(allows({ isAdmin: false, roles: ["dmc_member"] }, "recordRecommendation")).toBe(true);
    expect(allows({ isAdmin: false, roles: ["unblinded_statistician"] }, "recordRecommendation")).toBe(false);
    expect(allows({ isAdmin: true, roles: [] }, "lockDesign")).toBe(false);
    expect(allows({ isAdmin: false, roles: ["unblinded_statistician"] }, "lockDesign")).toBe(true);
  });
  it("no role means no capability", () => {
    expect(allows({ isAdmin: false, roles: [] }, "viewOpen")).toBe(false);
  });
});
