import { describe, expect, it } from "vitest";
import { accountActionSchema, assignRoleSchema, createAccountSchema } from "./schemas";

describe("account creation input", () => {
  const good = { name: "A Person", email: "a.person@test.example", isAdmin: "on" };
  it("accepts a complete form and reads the checkbox; a password sent along is dropped, never stored", () => {
    expect(createAccountSchema.parse(good)).toEqual({ ...good, isAdmin: true });
    expect(createAccountSchema.parse({ ...good, password: "chosen-by-the-administrator" })).not.toHaveProperty("password");
  });
  it.each([
    [{ name: "" }, "name", "Enter the person's name."],
    [{ name: "x".repeat(121) }, "name", "The name can be at most 120 characters."],
    [{ email: "not-an-email" }, "email", "Enter a valid e-mail address."],
    [{ email: `${"x".repeat(250)}@t.example` }, "email", "The e-mail address is too long."],
  ])("refuses %j with a message on %s", (patch, field, message) => {
    const r = createAccountSchema.safeParse({ ...good, ...patch });
    expect(r.success).toBe(false);
    const errs = r.success ? {} : r.error.flatten().fieldErrors;
    expect(errs[field as keyof typeof errs]).toContain(message);
  });
});

describe("role assignment input", () => {
  it("refuses an unknown role and non-numeric ids", () => {
    expect(assignRoleSchema.safeParse({ userId: "1", trialId: "2", role: "owner" }).success).toBe(false);
    expect(assignRoleSchema.safeParse({ userId: "x", trialId: "2", role: "sponsor" }).success).toBe(false);
    expect(assignRoleSchema.parse({ userId: "1", trialId: "2", role: "sponsor" })).toEqual({ userId: 1, trialId: 2, role: "sponsor" });
  });
});

describe("account action input", () => {
  it.each(["", "0", "-3", "1.5", "abc", "1e400"])("refuses the id %j", (userId) => {
    expect(accountActionSchema.safeParse({ userId }).success).toBe(false);
  });
  it("reads a positive id", () => {
    expect(accountActionSchema.parse({ userId: "42" })).toEqual({ userId: 42 });
  });
});
