import type { ButtonHTMLAttributes } from "react";

type Variant = "primary" | "secondary" | "danger" | "quiet";
const VARIANTS: Record<Variant, string> = {
  primary: "bg-lichen-600 text-white hover:bg-lichen-700 disabled:bg-stone-300",
  secondary: "bg-white text-stone-800 border border-stone-300 hover:bg-stone-100 disabled:text-stone-400",
  danger: "bg-berry-600 text-white hover:bg-berry-700 disabled:bg-stone-300",
  quiet: "bg-transparent text-lichen-700 hover:bg-lichen-50",
};

export function buttonClass(variant: Variant = "primary", extra = "") {
  return `inline-flex items-center justify-center gap-2 rounded-md no-underline px-3.5 py-2 text-sm font-medium transition-colors disabled:cursor-not-allowed ${VARIANTS[variant]} ${extra}`;
}

export function Button({ variant = "primary", className = "", ...rest }: ButtonHTMLAttributes<HTMLButtonElement> & { variant?: Variant }) {
  return <button className={buttonClass(variant, className)} {...rest} />;
}
