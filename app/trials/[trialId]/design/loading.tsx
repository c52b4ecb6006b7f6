export default function DesignLoading() {
  return <p role="status" className="text-sm text-stone-500">Loading the design…</p>;
}
