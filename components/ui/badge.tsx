import type { ReactNode } from "react";

type Tone = "neutral" | "lichen" | "amber" | "teal" | "berry";
const TONES: Record<Tone, string> = {
  neutral: "bg-stone-100 text-stone-700 border-stone-200",
  lichen: "bg-lichen-50 text-lichen-800 border-lichen-100",
  amber: "bg-amber-50 text-amber-700 border-amber-100",
  teal: "bg-tealx-50 text-tealx-700 border-tealx-100",
  berry: "bg-berry-50 text-berry-700 border-berry-100",
};

/** Every badge reads with a capital first letter ("Locked", "Scheduled"), whatever word it is given. */
export function Badge({ tone = "neutral", children }: { tone?: Tone; children: ReactNode }) {
  return (
    <span className={`inline-flex items-center whitespace-nowrap rounded-full border px-2 py-0.5 text-xs font-medium ${TONES[tone]}`}>
      <span className="inline-block first-letter:uppercase">{children}</span>
    </span>
  );
}
