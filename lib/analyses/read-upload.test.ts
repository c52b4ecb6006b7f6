import { describe, expect, it } from "vitest";
import { HttpError } from "@/lib/http";
import { readCsvUpload } from "./read-upload";

/** A body streamed in chunks with no Content-Length, as a chunked upload arrives. */
function streamed(totalBytes: number, chunk = 64 * 1024): { req: Request; pulled: () => number } {
  let sent = 0;
  const body = new ReadableStream<Uint8Array>({
    pull(c) {
      if (sent >= totalBytes) return c.close();
      const n = Math.min(chunk, totalBytes - sent);
      sent += n;
      c.enqueue(new Uint8Array(n).fill(0x41));
    },
  });
  const req = new Request("http://x/upload", { method: "POST", body, headers: { "content-type": "text/csv" }, duplex: "half" } as RequestInit);
  return { req, pulled: () => sent };
}

async function statusOf(p: Promise<unknown>): Promise<number | "ok"> {
  try {
    await p;
    return "ok";
  } catch (e) {
    if (e instanceof HttpError) return e.status;
    throw e;
  }
}

describe("readCsvUpload", () => {
  it("refuses a declared 50 MB body before reading any of it (413)", async () => {
    const req = new Request("http://x/upload", { method: "POST", body: "a", headers: { "content-type": "text/csv", "content-length": String(50 * 1024 * 1024) } });
    expect(await statusOf(readCsvUpload(req))).toBe(413);
  });
  it("cuts off an undeclared body as soon as it passes the limit, without reading the rest", async () => {
    const s = streamed(50 * 1024 * 1024);
    expect(await statusOf(readCsvUpload(s.req, 1024 * 1024))).toBe(413);
    expect(s.pulled()).toBeLessThan(2 * 1024 * 1024);
  });
  it("reads a body under the limit exactly", async () => {
    const s = streamed(300_000);
    const bytes = await readCsvUpload(s.req, 1024 * 1024);
    expect(bytes.byteLength).toBe(300_000);
    expect(bytes[299_999]).toBe(0x41);
  });
  it("refuses a body that is not sent as CSV text (415)", async () => {
    const req = new Request("http://x/upload", { method: "POST", body: "{}", headers: { "content-type": "application/json" } });
    expect(await statusOf(readCsvUpload(req))).toBe(415);
  });
});
