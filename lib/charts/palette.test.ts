import { describe, expect, it } from "vitest";
import { CAIRN_COLOURS } from "./palette";

/**
 * Relative luminance and contrast ratio exactly as WCAG 2.2 defines them (Understanding WCAG 2.2,
 * "relative luminance" and "contrast ratio"; the 0.04045 threshold of the sRGB standard).
 */
function luminance(hex: string): number {
  const [r, g, b] = [1, 3, 5].map((i) => parseInt(hex.slice(i, i + 2), 16) / 255).map((c) => (c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4));
  return 0.2126 * r + 0.7152 * g + 0.0722 * b;
}
const contrast = (a: string, b: string) => {
  const [hi, lo] = [luminance(a), luminance(b)].sort((x, y) => y - x);
  return (hi + 0.05) / (lo + 0.05);
};

describe("chart palette", () => {
  it("the contrast formula gives WCAG's end points: 21:1 for black on white, 1:1 for a colour on itself", () => {
    expect(contrast("#000000", "#ffffff")).toBeCloseTo(21, 12);
    expect(contrast("#17707a", "#17707a")).toBe(1);
  });
  it("every chart colour keeps at least 3:1 against the white plot background (WCAG 1.4.11)", () => {
    for (const [name, hex] of Object.entries(CAIRN_COLOURS)) expect(contrast(hex, "#ffffff"), name).toBeGreaterThanOrEqual(3);
  });
  it("the check can fail: the light grey of a disabled control is below 3:1", () => {
    expect(contrast("#c8c3b8", "#ffffff")).toBeLessThan(3);
  });
});
