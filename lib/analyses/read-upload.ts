import "server-only";
import { HttpError } from "@/lib/http";
import { MAX_UPLOAD_BYTES, tooLargeMessage } from "@/lib/csv/patient-outcomes";

const CSV_TYPES = ["text/csv", "text/plain", "application/csv", "application/vnd.ms-excel", "application/octet-stream", ""];

/**
 * Reads an uploaded CSV body (raw bytes, not multipart) with a hard size ceiling: a declared
 * Content-Length over the limit is refused before reading, and a body without one is cut off
 * as soon as it passes the limit, so a 50 MB file never sits in memory.
 */
export async function readCsvUpload(req: Request, maxBytes = MAX_UPLOAD_BYTES): Promise<Uint8Array> {
  const type = (req.headers.get("content-type") ?? "").split(";")[0].trim().toLowerCase();
  if (!CSV_TYPES.includes(type)) throw new HttpError(415, `Send the file as text/csv; "${type}" is not a CSV upload.`);
  const declared = req.headers.get("content-length");
  if (declared !== null && Number(declared) > maxBytes) throw new HttpError(413, tooLargeMessage(Number(declared)));
  if (!req.body) return new Uint8Array();
  const reader = req.body.getReader();
  const chunks: Uint8Array[] = [];
  let total = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    total += value.byteLength;
    if (total > maxBytes) {
      await reader.cancel().catch(() => undefined);
      throw new HttpError(413, `The file is larger than the ${maxBytes / (1024 * 1024)} MB limit. Split the export or remove columns Cairn does not use.`);
    }
    chunks.push(value);
  }
  const out = new Uint8Array(total);
  let at = 0;
  for (const c of chunks) {
    out.set(c, at);
    at += c.byteLength;
  }
  return out;
}
