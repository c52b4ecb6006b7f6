import { describe, expect, it } from "vitest";
import { armsFor, newTrialSchema } from "./trial-schema";

const ok = { code: "CRN-410", title: "An invented phase II study", sponsorName: "Invented Bio", phase: "II", designType: "single", endpointName: "Response", targetEnrolment: "40", armLabel: "TLM-900" };

describe("newTrialSchema", () => {
  it("accepts a single-arm trial and turns the enrolment text into a number", () => {
    const r = newTrialSchema.parse(ok);
    expect(r.targetEnrolment).toBe(40);
    expect(r.toxicityEndpointName).toBe(null);
    expect(armsFor(r)).toEqual([{ label: "TLM-900", armRole: "single" }]);
  });

  it("a two-arm trial needs both arm labels, and they must differ", () => {
    const base = { ...ok, designType: "two", armLabel: "" };
    const missing = newTrialSchema.safeParse(base);
    expect(missing.success).toBe(false);
    const fe = missing.error!.flatten().fieldErrors as Record<string, string[]>;
    expect(fe.experimentalArmLabel).toEqual(["Enter the experimental arm's label."]);
    expect(fe.controlArmLabel).toEqual(["Enter the control arm's label."]);
    const same = newTrialSchema.safeParse({ ...base, experimentalArmLabel: "A", controlArmLabel: "A" });
    expect((same.error!.flatten().fieldErrors as Record<string, string[]>).controlArmLabel).toEqual(["The two arms need different labels."]);
    const good = newTrialSchema.parse({ ...base, experimentalArmLabel: "E", controlArmLabel: "C" });
    expect(armsFor(good).map((a) => a.armRole)).toEqual(["experimental", "control"]);
  });

  it("rejects a bad code, a fractional or tiny enrolment and a blank title, each at its field", () => {
    const r = newTrialSchema.safeParse({ ...ok, code: "a b", targetEnrolment: "2.5", title: "  " });
    const fe = r.error!.flatten().fieldErrors as Record<string, string[]>;
    expect(fe.code[0]).toMatch(/letters, digits/);
    expect(fe.targetEnrolment).toEqual(["The target enrolment must be a whole number."]);
    expect(fe.title).toEqual(["Enter a title."]);
    expect(newTrialSchema.safeParse({ ...ok, targetEnrolment: "1" }).success).toBe(false);
  });
});
