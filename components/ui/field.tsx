import type { InputHTMLAttributes, ReactNode, SelectHTMLAttributes, TextareaHTMLAttributes } from "react";

/** A labelled input with its error announced politely next to it. */
export function Field({
  label,
  name,
  id,
  error,
  hint,
  children,
}: {
  label: ReactNode;
  name: string;
  /** The control's id when it is not its name. */
  id?: string;
  error?: string | string[];
  hint?: string;
  children: ReactNode;
}) {
  const msg = Array.isArray(error) ? error[0] : error;
  return (
    <div className="flex flex-col gap-1">
      <label htmlFor={id ?? name} className="text-sm font-medium text-stone-700">
        {label}
      </label>
      {children}
      {hint && !msg ? <p className="text-xs text-stone-500">{hint}</p> : null}
      <p id={`${name}-error`} aria-live="polite" className="min-h-0 text-xs text-berry-700">
        {msg ?? ""}
      </p>
    </div>
  );
}

/** Published notation shown small beside a label in words (the words lead; the symbol is secondary). */
export function Notation({ children }: { children: ReactNode }) {
  return <span className="ml-1 text-xs font-normal text-stone-500">{children}</span>;
}

/** Full width of its column unless a width is given, and allowed to shrink, so forms reflow at 320 px. */
const width = (className: string) => (/(^|\s)w-/.test(className) ? "" : "w-full min-w-0");
const INPUT = "max-w-full rounded-md border border-stone-300 bg-white px-3 py-2 text-sm text-stone-900 placeholder:text-stone-400 focus:border-lichen-600 aria-[invalid=true]:border-berry-600";

export function TextInput({ invalid, className = "", ...rest }: InputHTMLAttributes<HTMLInputElement> & { invalid?: boolean }) {
  return <input className={`${INPUT} ${width(className)} ${className}`} aria-invalid={invalid || undefined} aria-describedby={rest.name ? `${rest.name}-error` : undefined} {...rest} />;
}

export function SelectInput({ invalid, className = "", ...rest }: SelectHTMLAttributes<HTMLSelectElement> & { invalid?: boolean }) {
  return <select className={`${INPUT} ${width(className)} ${className}`} aria-invalid={invalid || undefined} aria-describedby={rest.name ? `${rest.name}-error` : undefined} {...rest} />;
}

export function TextArea({ invalid, className = "", ...rest }: TextareaHTMLAttributes<HTMLTextAreaElement> & { invalid?: boolean }) {
  return <textarea className={`${INPUT} ${width(className)} ${className}`} aria-invalid={invalid || undefined} aria-describedby={rest.name ? `${rest.name}-error` : undefined} {...rest} />;
}
