import type { ReactNode } from "react";

export function Card({ title, actions, children, className = "" }: { title?: ReactNode; actions?: ReactNode; children: ReactNode; className?: string }) {
  return (
    // min-w-0 and the scrolling body: a wide table scrolls inside its card, never the page (390 px phones).
    <section className={`min-w-0 rounded-card border border-stone-200 bg-white p-4 shadow-[0_1px_0_rgba(0,0,0,0.03)] sm:p-5 ${className}`}>
      {title || actions ? (
        <header className="mb-3 flex flex-wrap items-center justify-between gap-3">
          {title ? <h2 className="text-lg font-semibold text-stone-800">{title}</h2> : <span />}
          {actions}
        </header>
      ) : null}
      {/* Wide tables and grids scroll inside the card, so the page itself reflows at 320 px (WCAG 1.4.10);
          relative, so an absolutely placed child (sr-only text in a table header) is clipped here rather than
          widening the page; the small inset keeps focus rings visible. */}
      <div className="relative -m-1.5 min-w-0 overflow-x-auto p-1.5">{children}</div>
    </section>
  );
}
