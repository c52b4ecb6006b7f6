import { notFound } from "next/navigation";

/** Parses a numeric id from a dynamic route segment; anything else is a 404, never a 500. */
export function parseId(raw: string | undefined): number {
  if (!raw || !/^[1-9][0-9]{0,9}$/.test(raw)) notFound();
  const n = Number(raw);
  if (n > 2_147_483_647) notFound();
  return n;
}
