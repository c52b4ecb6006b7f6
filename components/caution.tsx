import { CAUTION_TEXT } from "@/lib/caution";

export { CAUTION_TEXT };

export function Caution() {
  return (
    <aside aria-label="Caution" data-testid="caution" className="rounded-md border border-amber-100 bg-amber-50 px-4 py-2 text-xs text-amber-700">
      <strong className="font-semibold">Caution.</strong> {CAUTION_TEXT}
    </aside>
  );
}
