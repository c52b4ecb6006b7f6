import { HttpError } from "@/lib/http";

/** The HTTP status a call would answer with: 200 when it resolves, the HttpError's status, 422 for a ZodError. */
export async function statusOf(p: Promise<unknown>): Promise<number> {
  try {
    await p;
    return 200;
  } catch (e) {
    if (e instanceof HttpError) return e.status;
    if ((e as Error).name === "ZodError") return 422;
    throw e;
  }
}
