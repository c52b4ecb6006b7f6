/**
 * What every page must satisfy at every width, as a list of checks run in the browser by
 * tests/e2e/surface.spec.ts. Each check returns the problems it found (empty when the page passes),
 * so a new rule is one more entry in SURFACE_CHECKS.
 */
import type { Page } from "@playwright/test";

export type SurfaceCheck = { name: string; run: (page: Page) => Promise<string[]> };

/** The page itself never scrolls sideways; wide content scrolls inside its own box. */
export const noHorizontalPageScroll: SurfaceCheck = {
  name: "no horizontal page scroll",
  run: (page) =>
    page.evaluate(() => {
      const root = document.documentElement;
      const wide = Math.max(root.scrollWidth, document.body.scrollWidth);
      if (wide <= root.clientWidth + 1) return [];
      // Name the widest offenders, to say where to look.
      const culprits = [...document.querySelectorAll<HTMLElement>("body *")]
        .filter((el) => el.getBoundingClientRect().right > root.clientWidth + 1 && !el.closest("[data-scroll-inside], .overflow-x-auto, .ag-root-wrapper"))
        .slice(0, 3)
        .map((el) => `${el.tagName.toLowerCase()}${el.id ? `#${el.id}` : ""}.${[...el.classList].slice(0, 3).join(".")} (${Math.round(el.getBoundingClientRect().right)} px)`);
      return [`the page is ${wide} px wide in a ${root.clientWidth} px window: ${culprits.join(", ")}`];
    }),
};

/** A grid header shows its whole text: no column header cut short with an ellipsis. */
export const noTruncatedGridHeader: SurfaceCheck = {
  name: "no truncated grid header",
  run: (page) =>
    page.evaluate(() =>
      [...document.querySelectorAll<HTMLElement>(".ag-header-cell-text")]
        .filter((el) => el.offsetParent !== null && el.scrollWidth > el.clientWidth + 1)
        .map((el) => `grid header "${el.textContent?.trim()}" is cut short (${el.scrollWidth} px of text in ${el.clientWidth} px)`),
    ),
};

/**
 * Every form field has a label in words: a label made only of Greek letters, symbols and subscripts
 * ("θT", "pL") names nothing for a person new to the method.
 */
export const noGreekOnlyLabel: SurfaceCheck = {
  name: "no Greek-letter-only label",
  run: (page) =>
    page.evaluate(() => {
      const problems: string[] = [];
      const labelOf = (el: HTMLElement): string => {
        const parts: string[] = [];
        const by = el.getAttribute("aria-labelledby");
        if (by) for (const id of by.split(/\s+/)) parts.push(document.getElementById(id)?.textContent ?? "");
        if (el.getAttribute("aria-label")) parts.push(el.getAttribute("aria-label")!);
        const withLabels = el as HTMLInputElement;
        for (const l of withLabels.labels ?? []) parts.push(l.textContent ?? "");
        return parts.join(" ").replace(/\s+/g, " ").trim();
      };
      for (const el of document.querySelectorAll<HTMLElement>("input:not([type=hidden]), select, textarea")) {
        if (el.offsetParent === null) continue;
        const label = labelOf(el);
        if (!/\p{Script=Greek}/u.test(label)) continue;
        // Words: a run of three or more Latin letters. A Greek symbol must stand beside words.
        if (!/[A-Za-z]{3,}/.test(label.replace(/\p{Script=Greek}/gu, " "))) problems.push(`form field ${el.id || el.getAttribute("name") || el.tagName} is labelled only "${label}"`);
      }
      return problems;
    }),
};

/** No chart-library toolbar (it offers an upload to a hosted service and clutters the tab order). */
export const noChartToolbar: SurfaceCheck = {
  name: "no chart toolbar",
  run: (page) =>
    // Plotly leaves an empty .modebar-container even with displayModeBar: false; no group or button may be in it.
    page.evaluate(() => [...document.querySelectorAll(".modebar-group, .modebar-btn")].slice(0, 1).map(() => "a chart shows the chart library's toolbar")),
};

/** Every chart has a visible title (components/charts/chart-figure.tsx). */
export const everyChartTitled: SurfaceCheck = {
  name: "every chart has a visible title",
  run: (page) =>
    page.evaluate(() =>
      [...document.querySelectorAll<HTMLElement>("[data-chart]")]
        .filter((fig) => {
          const title = fig.querySelector<HTMLElement>("[data-chart-title]");
          return !title || !title.textContent?.trim() || title.offsetParent === null;
        })
        .map((_, i) => `chart ${i + 1} on the page has no visible title`),
    ),
};

export const SURFACE_CHECKS: SurfaceCheck[] = [noHorizontalPageScroll, noTruncatedGridHeader, noGreekOnlyLabel, noChartToolbar, everyChartTitled];
