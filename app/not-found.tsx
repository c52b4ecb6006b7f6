import Link from "next/link";

export default function NotFound() {
  return (
    <div className="mx-auto mt-10 max-w-lg">
      <h1>Not found</h1>
      <p className="mt-2 text-sm text-stone-600">That page does not exist, or you do not hold a role on that trial.</p>
      <p className="mt-4"><Link href="/trials">Back to your trials</Link></p>
    </div>
  );
}
