import { describe, expect, it } from "vitest";
import { expandLooks } from "./looks";
import { StatsDomainError } from "./validate";

describe("expandLooks", () => {
  it("sorts an explicit list, merges duplicates, drops sizes above nMax and ends at nMax", () => {
    expect(expandLooks({ kind: "list", sizes: [20, 10, 10, 50] }, 40)).toEqual([10, 20, 40]);
  });
  it("does not repeat nMax when the list already holds it", () => {
    expect(expandLooks({ kind: "list", sizes: [15, 30] }, 30)).toEqual([15, 30]);
  });
  it("an empty list means a single final analysis", () => {
    expect(expandLooks({ kind: "list", sizes: [] }, 12)).toEqual([12]);
  });
  it("every k from a first look, with nMax added when the step does not land on it", () => {
    expect(expandLooks({ kind: "every", first: 10, every: 5 }, 22)).toEqual([10, 15, 20, 22]);
    expect(expandLooks({ kind: "every", first: 1, every: 1 }, 4)).toEqual([1, 2, 3, 4]);
  });
  it("a first look beyond nMax leaves only the final analysis", () => {
    expect(expandLooks({ kind: "every", first: 50, every: 5 }, 40)).toEqual([40]);
  });

  const bad: [string, () => unknown, string][] = [
    ["nMax must be a positive integer (0)", () => expandLooks({ kind: "list", sizes: [] }, 0), "nMax"],
    ["nMax must be an integer", () => expandLooks({ kind: "list", sizes: [] }, 10.5), "nMax"],
    ["a listed size must be a positive integer (0)", () => expandLooks({ kind: "list", sizes: [0, 5] }, 10), "looks.sizes[]"],
    ["a listed size must be an integer", () => expandLooks({ kind: "list", sizes: [2.5] }, 10), "looks.sizes[]"],
    ["a listed size must be finite", () => expandLooks({ kind: "list", sizes: [NaN] }, 10), "looks.sizes[]"],
    ["first must be a positive integer", () => expandLooks({ kind: "every", first: 0, every: 2 }, 10), "looks.first"],
    ["every must be a positive integer", () => expandLooks({ kind: "every", first: 2, every: 0 }, 10), "looks.every"],
    ["the schedule kind must be known", () => expandLooks({ kind: "weekly" } as never, 10), "looks.kind"],
  ];
  for (const [title, call, argument] of bad)
    it(`rejects: ${title}`, () => {
      expect(call).toThrow(StatsDomainError);
      try {
        call();
      } catch (e) {
        expect((e as StatsDomainError).argument).toBe(argument);
      }
    });
});
