"use client";
import { Button } from "@/components/ui/button";

export default function ErrorPage({ reset }: { error: Error & { digest?: string }; reset: () => void }) {
  return (
    <div className="mx-auto mt-10 max-w-lg">
      <h1>Something went wrong</h1>
      <p className="mt-2 text-sm text-stone-600">Nothing you entered was lost on the server. If the database was restarting, try again in a few seconds.</p>
      <Button className="mt-4" onClick={() => reset()}>Try again</Button>
    </div>
  );
}
