import type { ReactNode } from "react";

type Tone = "info" | "warning" | "danger" | "success";
const TONES: Record<Tone, string> = {
  info: "border-stone-300 bg-stone-100 text-stone-800",
  warning: "border-amber-100 bg-amber-50 text-amber-700",
  danger: "border-berry-100 bg-berry-50 text-berry-700",
  success: "border-lichen-100 bg-lichen-50 text-lichen-800",
};

/** A full-width message. `role="status"` for news, `role="alert"` (danger) for something that needs action. */
export function Banner({ tone = "info", title, children }: { tone?: Tone; title?: string; children?: ReactNode }) {
  return (
    <div role={tone === "danger" ? "alert" : "status"} className={`rounded-md border px-4 py-3 text-sm ${TONES[tone]}`}>
      {title ? <p className="font-semibold">{title}</p> : null}
      {children ? <div className={title ? "mt-1" : ""}>{children}</div> : null}
    </div>
  );
}
