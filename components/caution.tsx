/** The caution every trial page and packet carries (product brief, "Cautions"). */
export const CAUTION_TEXT =
  "Decision support only. Stopping, continuing or changing a trial is decided by the DMC under its charter, the protocol, and the applicable regulations and ethics approvals, not by Cairn.";

export function Caution() {
  return (
    <aside aria-label="Caution" data-testid="caution" className="rounded-md border border-amber-100 bg-amber-50 px-4 py-2 text-xs text-amber-700">
      <strong className="font-semibold">Caution.</strong> {CAUTION_TEXT}
    </aside>
  );
}
