import { describe, expect, it } from "vitest";
import { armCountsSchema, reopenAnalysisSchema, saveCountsSchema } from "./schemas";

const two = { armIds: [11, 12], safetyRule: false };
const one = { armIds: [5], safetyRule: true };
const oneMax40 = { armIds: [5], safetyRule: true, maxPerArm: 40 };
const paths = (r: { success: boolean; error?: { issues: Array<{ path: PropertyKey[]; message: string }> } }) =>
  Object.fromEntries((r.error?.issues ?? []).map((i) => [i.path.join("."), i.message]));

describe("armCountsSchema: the rules of interim counts", () => {
  it("accepts form text and JSON numbers alike", () => {
    const r = armCountsSchema(two).parse([
      { armId: "11", enrolled: "21", evaluable: "20", responders: "9", toxicities: "" },
      { armId: 12, enrolled: 22, evaluable: 20, responders: 5, toxicities: null },
    ]);
    expect(r).toEqual([
      { armId: 11, enrolled: 21, treated: null, evaluable: 20, pending: 0, responders: 9, toxicities: null },
      { armId: 12, enrolled: 22, treated: null, evaluable: 20, pending: 0, responders: 5, toxicities: null },
    ]);
  });
  it("pending (response not yet known) is optional, 0 when empty, and evaluable + pending may not exceed enrolled or the design's maximum", () => {
    const ok = armCountsSchema(two).parse([
      { armId: 11, enrolled: 21, evaluable: 18, pending: "3", responders: 9, toxicities: null },
      { armId: 12, enrolled: 22, evaluable: 20, pending: "", responders: 5, toxicities: null },
    ]);
    expect(ok.map((c) => c.pending)).toEqual([3, 0]);
    const bad = armCountsSchema(two).safeParse([
      { armId: 11, enrolled: 21, evaluable: 18, pending: 4, responders: 9, toxicities: null },
      { armId: 12, enrolled: 22, evaluable: 20, pending: -1, responders: 5, toxicities: null },
    ]);
    expect(paths(bad)).toEqual({
      "0.pending": "Evaluable (18) plus pending (4) cannot exceed enrolled (21): a pending patient is enrolled and not yet evaluable.",
      "1.pending": "The number pending (response not yet known) cannot be negative.",
    });
    const max = armCountsSchema({ ...two, maxPerArm: 20 }).safeParse([
      { armId: 11, enrolled: 20, evaluable: 18, pending: 2, responders: 9, toxicities: null },
      { armId: 12, enrolled: 20, evaluable: 19, pending: 1, responders: 5, toxicities: null },
    ]);
    expect(max.success).toBe(true);
  });
  it("responders <= evaluable <= enrolled, each reported on its own field", () => {
    const r = armCountsSchema(two).safeParse([
      { armId: 11, enrolled: 10, evaluable: 11, responders: 3, toxicities: null },
      { armId: 12, enrolled: 10, evaluable: 9, responders: 10, toxicities: null },
    ]);
    expect(paths(r)).toEqual({
      "0.evaluable": "Evaluable for response (11) cannot exceed enrolled (10).",
      "1.responders": "Responders (10) cannot exceed evaluable for response (9).",
    });
  });
  it("whole numbers >= 0 only, and empty is not zero", () => {
    const r = armCountsSchema(one).safeParse([{ armId: 5, enrolled: "-1", treated: "1", evaluable: "2.5", responders: "", toxicities: "x" }]);
    expect(paths(r)).toEqual({
      "0.enrolled": "The number enrolled cannot be negative.",
      "0.evaluable": "The number evaluable for response must be a whole number.",
      "0.responders": "Enter the number of responders as a whole number.",
      "0.toxicities": "Enter the number with toxicity as a whole number.",
    });
  });
  it("toxicities: required with a safety rule (and <= treated <= enrolled), refused without one", () => {
    expect(paths(armCountsSchema(one).safeParse([{ armId: 5, enrolled: 3, treated: 3, evaluable: 3, responders: 1, toxicities: 4 }]))).toEqual({
      "0.toxicities": "Patients with toxicity (4) cannot exceed treated, the patients evaluable for toxicity (3).",
    });
    expect(paths(armCountsSchema(one).safeParse([{ armId: 5, enrolled: 3, treated: 4, evaluable: 3, responders: 1, toxicities: 1 }]))).toEqual({
      "0.treated": "Treated (4) cannot exceed enrolled (3).",
    });
    expect(paths(armCountsSchema(one).safeParse([{ armId: 5, enrolled: 3, evaluable: 3, responders: 1, toxicities: 1 }]))).toEqual({
      "0.treated": "Enter the number treated (evaluable for toxicity) as a whole number.",
    });
    expect(armCountsSchema(two).safeParse([
      { armId: 11, enrolled: 3, evaluable: 3, responders: 1, toxicities: 1 },
      { armId: 12, enrolled: 3, evaluable: 3, responders: 1, toxicities: null },
    ]).success).toBe(false);
  });
  it("finding 1: toxicities are bounded by treated, not by evaluable for response (8 of 21 treated, 15 evaluable is valid)", () => {
    expect(armCountsSchema(one).parse([{ armId: 5, enrolled: 21, treated: 21, evaluable: 15, responders: 4, toxicities: 8 }])).toEqual([
      { armId: 5, enrolled: 21, treated: 21, evaluable: 15, pending: 0, responders: 4, toxicities: 8 },
    ]);
  });
  it("finding 3: enrolled above the design's maximum sample size is refused; exactly at it is accepted", () => {
    expect(paths(armCountsSchema(oneMax40).safeParse([{ armId: 5, enrolled: 41, treated: 41, evaluable: 40, responders: 1, toxicities: 1 }]))).toEqual({
      "0.enrolled": expect.stringMatching(/above the locked design's maximum sample size for an arm \(40\)/),
    });
    expect(armCountsSchema(oneMax40).safeParse([{ armId: 5, enrolled: 40, treated: 40, evaluable: 40, responders: 40, toxicities: 40 }]).success).toBe(true);
  });
  it("every arm exactly once", () => {
    const c = { enrolled: 1, evaluable: 1, responders: 0, toxicities: null };
    expect(armCountsSchema(two).safeParse([{ armId: 11, ...c }]).success).toBe(false);
    expect(armCountsSchema(two).safeParse([{ armId: 11, ...c }, { armId: 11, ...c }]).success).toBe(false);
    expect(armCountsSchema(two).safeParse([{ armId: 12, ...c }, { armId: 11, ...c }]).success).toBe(true);
  });
});

describe("request schemas", () => {
  it("a cut-off must be a real date", () => {
    const r = saveCountsSchema(one).safeParse({ rowVersion: 1, cutoffDate: "2026-02-30", counts: [{ armId: 5, enrolled: 1, treated: 1, evaluable: 1, responders: 1, toxicities: 0 }] });
    expect(paths(r)).toEqual({ cutoffDate: "Enter the data cut-off date as a real date (YYYY-MM-DD)." });
  });
  it("a correction needs a reason of at least 10 characters", () => {
    expect(reopenAnalysisSchema.safeParse({ rowVersion: 3, reason: "  typo   " }).success).toBe(false);
    expect(reopenAnalysisSchema.parse({ rowVersion: "3", reason: "Site 3 miscoded two responders." })).toEqual({ rowVersion: 3, reason: "Site 3 miscoded two responders." });
  });
});
