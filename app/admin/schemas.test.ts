import { describe, expect, it } from "vitest";
import { assignRoleSchema, createAccountSchema } from "./schemas";

describe("account creation input", () => {
  const good = { name: "A Person", email: "a.person@test.example", password: "a-long-password", isAdmin: "on" };
  it("accepts a complete form and reads the checkbox", () => {
    expect(createAccountSchema.parse(good)).toEqual({ ...good, isAdmin: true });
  });
  it.each([
    [{ name: "" }, "name", "Enter the person's name."],
    [{ name: "x".repeat(121) }, "name", "The name can be at most 120 characters."],
    [{ email: "not-an-email" }, "email", "Enter a valid e-mail address."],
    [{ email: `${"x".repeat(250)}@t.example` }, "email", "The e-mail address is too long."],
    [{ password: "short" }, "password", "The password must be at least 12 characters."],
    [{ password: 12345678901234 }, "password", undefined],
  ])("refuses %j with a message on %s", (patch, field, message) => {
    const r = createAccountSchema.safeParse({ ...good, ...patch });
    expect(r.success).toBe(false);
    const errs = r.success ? {} : r.error.flatten().fieldErrors;
    expect(errs[field as keyof typeof errs]).toBeDefined();
    if (message) expect(errs[field as keyof typeof errs]).toContain(message);
  });
});

describe("role assignment input", () => {
  it("refuses an unknown role and non-numeric ids", () => {
    expect(assignRoleSchema.safeParse({ userId: "1", trialId: "2", role: "owner" }).success).toBe(false);
    expect(assignRoleSchema.safeParse({ userId: "x", trialId: "2", role: "sponsor" }).success).toBe(false);
    expect(assignRoleSchema.parse({ userId: "1", trialId: "2", role: "sponsor" })).toEqual({ userId: 1, trialId: 2, role: "sponsor" });
  });
});
