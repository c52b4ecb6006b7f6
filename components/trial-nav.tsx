"use client";
import Link from "next/link";
import { usePathname } from "next/navigation";

export type TrialTab = { href: string; label: string };

export function TrialNav({ tabs }: { tabs: TrialTab[] }) {
  const path = usePathname();
  return (
    <nav aria-label="Trial sections" className="flex flex-wrap gap-1 border-b border-stone-200">
      {tabs.map((t) => {
        const active = path === t.href || (t.href.split("/").length > 3 && path.startsWith(t.href));
        return (
          <Link
            key={t.href}
            href={t.href}
            aria-current={active ? "page" : undefined}
            className={`-mb-px border-b-2 px-3 py-2 text-sm no-underline ${
              active ? "border-lichen-600 font-semibold text-stone-900" : "border-transparent text-stone-600 hover:text-stone-900"
            }`}
          >
            {t.label}
          </Link>
        );
      })}
    </nav>
  );
}
