import { describe, expect, it } from "vitest";
import { recommendationSchema } from "./recommendation-schema";

describe("recommendation input", () => {
  it("accepts a first recommendation and turns an empty correction field into null", () => {
    const r = recommendationSchema.parse({ decision: "continue", rationale: "  No concerns at this look.  ", correctsId: "", password: "x" });
    expect(r).toEqual({ decision: "continue", rationale: "No concerns at this look.", correctsId: null, meetingId: null, dissent: null, password: "x" });
  });
  it("accepts a correction that names the entry it corrects", () => {
    expect(recommendationSchema.parse({ decision: "stop_safety", rationale: "Corrected after the safety listing.", correctsId: "12", password: "x" }).correctsId).toBe(12);
  });
  it("refuses an unknown decision, a short rationale, a missing password and a malformed correction id, naming each field", () => {
    const r = recommendationSchema.safeParse({ decision: "pause", rationale: "ok", correctsId: "abc", password: "" });
    expect(r.success).toBe(false);
    const fields = new Set(r.error!.issues.map((i) => i.path[0]));
    expect(fields).toEqual(new Set(["decision", "rationale", "correctsId", "password"]));
  });
});
