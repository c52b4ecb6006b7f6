import { describe, expect, it } from "vitest";
import { cell, countAxis, roundCountStep, sampleIndices } from "./chart-numbers";

describe("sampleIndices", () => {
  it("picks the grid points at each multiple of the step, ends included", () => {
    const xs = Array.from({ length: 201 }, (_, i) => i / 200);
    const idx = sampleIndices(xs, 0.05);
    expect(idx.map((i) => xs[i])).toEqual(Array.from({ length: 21 }, (_, k) => Number((k * 0.05).toFixed(10))).map((v) => xs[Math.round(v * 200)]));
    expect(idx[0]).toBe(0);
    expect(idx[idx.length - 1]).toBe(200);
  });
  it("keeps both ends of a grid that does not start on a multiple, and never repeats a point", () => {
    const xs = [-0.97, -0.5, 0.02, 0.33, 0.98];
    const idx = sampleIndices(xs, 0.5);
    expect(idx).toEqual([0, 1, 2, 3, 4]);
    expect(new Set(idx).size).toBe(idx.length);
  });
  it("refuses a step that is not positive", () => {
    expect(() => sampleIndices([0, 1], 0)).toThrow();
  });
});

describe("roundCountStep", () => {
  it("gives 1, 2 or 5 times a power of ten, never below 1", () => {
    expect(roundCountStep(3)).toBe(1);
    expect(roundCountStep(12)).toBe(2);
    expect(roundCountStep(40)).toBe(10);
    expect(roundCountStep(200)).toBe(50);
    expect(roundCountStep(0)).toBe(1);
    for (const max of [7, 19, 33, 61, 99, 150, 401, 999]) {
      const s = roundCountStep(max);
      const mantissa = s / 10 ** Math.floor(Math.log10(s));
      expect([1, 2, 5]).toContain(mantissa);
      expect(max / s).toBeLessThanOrEqual(6);
    }
  });
  it("countAxis starts at 0 with whole-number ticks", () => {
    expect(countAxis("Evaluable patients (count)", 40)).toMatchObject({ rangemode: "tozero", tick0: 0, dtick: 10, tickformat: "d" });
  });
});

describe("cell", () => {
  it("rounds to fixed decimals and keeps missing values missing", () => {
    expect(cell(0.12345)).toBe("0.123");
    expect(cell(null)).toBeNull();
    expect(cell(Number.NaN)).toBeNull();
    expect(cell(2, 0)).toBe("2");
  });
});
