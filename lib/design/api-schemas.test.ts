import { describe, expect, it } from "vitest";
import { ZodError } from "zod";
import { calibrationBodySchema, expandGrid, parseDesignForTrial } from "./api-schemas";
import { defaultDesign } from "./form-model";

describe("design API schemas", () => {
  it("expands grid ranges without floating drift", () => {
    expect(expandGrid({ from: 0.8, to: 0.95, step: 0.05 })).toEqual([0.8, 0.85, 0.9, 0.95]);
    expect(expandGrid({ from: 0, to: 0.2, step: 0.1 })).toEqual([0, 0.1, 0.2]);
    expect(expandGrid({ from: 0.5, to: 0.5, step: 0.1 })).toEqual([0.5]);
  });

  it("refuses a design whose arm count differs from the trial's, at the path 'arms'", () => {
    try {
      parseDesignForTrial(defaultDesign("single"), "two");
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(ZodError);
      expect((e as ZodError).issues[0].path).toEqual(["arms"]);
    }
    expect(parseDesignForTrial(defaultDesign("two"), "two").arms).toBe("two");
  });

  it("reports design issues with design paths", () => {
    const bad = { ...defaultDesign("single"), p0: 1.5 };
    try {
      parseDesignForTrial(bad, "single");
      expect.unreachable();
    } catch (e) {
      expect((e as ZodError).issues.map((i) => i.path.join("."))).toContain("p0");
    }
  });

  it("caps the calibration grid size", () => {
    const body = { spec: {}, typeIErrorLimit: 0.1, powerTarget: 0.8, thetaT: { from: 0, to: 1, step: 0.01 }, thetaL: { from: 0, to: 1, step: 0.01 }, thetaU: { from: 0.5, to: 1, step: 0.01 } };
    expect(calibrationBodySchema.safeParse(body).success).toBe(false);
    expect(calibrationBodySchema.safeParse({ ...body, thetaU: null }).success).toBe(true);
    expect(calibrationBodySchema.safeParse({ ...body, thetaU: null, thetaT: { from: 0.9, to: 0.8, step: 0.01 } }).success).toBe(false);
  });
});
