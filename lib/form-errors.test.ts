import { describe, expect, it } from "vitest";
import { z } from "zod";
import { errorSummary, fieldErrorsSummary, fieldName, issueSentence } from "./form-errors";

const issuesOf = (schema: z.ZodTypeAny, value: unknown) => {
  const r = schema.safeParse(value);
  if (r.success) throw new Error("expected a failure");
  return r.error.issues;
};

describe("zod issues as sentences", () => {
  it("keeps a schema's own message", () => {
    const [i] = issuesOf(z.object({ rationale: z.string().min(3, "Write at least 3 characters.") }), { rationale: "x" });
    expect(issueSentence(i)).toBe("Write at least 3 characters.");
  });

  it("rewrites zod's default messages by code (zod's own text never reaches the person)", () => {
    const schema = z.object({ n: z.number(), name: z.string().min(1), code: z.string().max(4), kind: z.enum(["a", "b"]), email: z.email(), looks: z.array(z.number()).min(1), rate: z.number().gt(0) });
    const issues = issuesOf(schema, { n: "x", name: "", code: "toolong", kind: "c", email: "no", looks: [], rate: 0 });
    const by = Object.fromEntries(issues.map((i) => [i.path.join("."), issueSentence(i)]));
    expect(by).toEqual({
      n: "Enter a number.",
      name: "Fill this in.",
      code: "Write at most 4 characters.",
      kind: "Choose one of the offered options.",
      email: "Enter an e-mail address such as name@example.org.",
      looks: "Choose at least one.",
      rate: "Enter a number above 0.",
    });
    for (const i of issues) expect(issueSentence(i)).not.toMatch(/Invalid|expected|received/);
  });

  it("says a missing field is missing", () => {
    const [i] = issuesOf(z.object({ cutoffDate: z.string() }), {});
    expect(issueSentence(i)).toBe("Fill this in.");
  });

  it("names fields in words and sums them up at the top", () => {
    expect(fieldName("cutoffDate")).toBe("Cutoff date");
    expect(fieldName(["counts", 0, "responders"])).toBe("Responders, row 1");
    expect(fieldName("cutoffDate", { cutoffDate: "Data cut-off date" })).toBe("Data cut-off date");
    const issues = issuesOf(z.object({ cutoffDate: z.string(), n: z.number().int() }), { n: 1.5 });
    expect(errorSummary(issues)).toBe("Check 2 fields: Cutoff date: Fill this in. N: Enter a whole number.");
    expect(fieldErrorsSummary({ password: ["Enter your password."], other: [] })).toBe("Check 1 field: Password: Enter your password.");
    expect(fieldErrorsSummary({})).toBeNull();
  });
});
