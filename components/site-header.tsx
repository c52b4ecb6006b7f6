import Link from "next/link";
import { currentUser } from "@/lib/auth";
import { SignOutButton } from "./sign-out-button";

function CairnMark() {
  // Three stacked stones.
  return (
    <svg aria-hidden="true" width="26" height="26" viewBox="0 0 26 26">
      <ellipse cx="13" cy="21" rx="10" ry="4" fill="#5e584c" />
      <ellipse cx="13" cy="14" rx="7" ry="3.4" fill="#797263" />
      <ellipse cx="13" cy="8" rx="4.4" ry="2.6" fill="#3f7d4f" />
    </svg>
  );
}

export async function SiteHeader() {
  const user = await currentUser().catch(() => null);
  return (
    <header className="border-b border-stone-200 bg-white">
      <div className="mx-auto flex max-w-7xl flex-wrap items-center justify-between gap-2 px-5 py-3">
        <Link href="/trials" className="flex items-center gap-2 text-lg font-semibold text-stone-900 no-underline">
          <CairnMark /> Cairn
        </Link>
        {user ? (
          <nav aria-label="Account" className="flex flex-wrap items-center gap-x-4 gap-y-1 text-sm">
            <Link href="/trials" className="no-underline hover:underline">Trials</Link>
            {user.isAdmin ? <Link href="/admin" className="no-underline hover:underline">Administration</Link> : null}
            <Link href="/account" className="text-stone-600 no-underline hover:underline" data-testid="signed-in-as" title="Your account: change your password">
              {user.name}
            </Link>
            <SignOutButton />
          </nav>
        ) : null}
      </div>
    </header>
  );
}
