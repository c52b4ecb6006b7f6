"use client";
/**
 * Placed inside a form: each time `after` changes (the state a submit returned), focus moves to
 * the form's first invalid field, so a keyboard or screen-reader user lands on what to fix (WCAG
 * 3.3.1). A field counts as invalid when it says aria-invalid="true" or when the error line it is
 * described by (components/ui/field.tsx, id NAME-error) has text. The errors themselves stay in
 * their live regions.
 */
import { useEffect, useRef } from "react";

const CONTROLS = "input:not([type=hidden]), select, textarea";

export function firstInvalidControl(form: HTMLElement): HTMLElement | null {
  const marked = form.querySelector<HTMLElement>(`:is(${CONTROLS})[aria-invalid="true"]`);
  if (marked) return marked;
  for (const el of form.querySelectorAll<HTMLElement>(CONTROLS)) {
    const ids = (el.getAttribute("aria-describedby") ?? "").split(/\s+/).filter(Boolean);
    if (ids.some((id) => (form.ownerDocument.getElementById(id)?.textContent ?? "").trim() !== "")) return el;
  }
  return null;
}

export function FocusFirstInvalid({ after }: { after: unknown }) {
  const marker = useRef<HTMLSpanElement>(null);
  const first = useRef(true);
  useEffect(() => {
    // Not on the first render: a page that opens with errors already shown keeps its focus.
    if (first.current) {
      first.current = false;
      return;
    }
    const form = marker.current?.closest("form, [data-focus-scope]") as HTMLElement | null;
    if (form) firstInvalidControl(form)?.focus();
  }, [after]);
  return <span ref={marker} hidden />;
}
