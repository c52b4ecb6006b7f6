export default function Loading() {
  return <p className="text-sm text-stone-500" role="status">Loading…</p>;
}
