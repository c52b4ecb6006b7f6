import Link from "next/link";

export default function Forbidden() {
  return (
    <div className="mx-auto mt-10 max-w-lg">
      <h1>Not available to your role</h1>
      <p className="mt-2 text-sm text-stone-600">
        Your role on this trial does not give access to this page. Closed (unblinded) results are only for the DMC and the unblinded statistician.
      </p>
      <p className="mt-4"><Link href="/trials">Back to your trials</Link></p>
    </div>
  );
}
