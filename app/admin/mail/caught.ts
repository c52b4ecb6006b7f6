import "server-only";
/**
 * Reads the local mail catcher's folder (scripts/mail-catcher.ts writes an .eml and a .json
 * summary per message). Development and test only: in production no catcher runs and the folder
 * is empty or absent.
 */
import { readdir, readFile } from "node:fs/promises";
import path from "node:path";
import { z } from "zod";
import { config } from "@/lib/config";

const summarySchema = z.object({
  id: z.string(),
  receivedAt: z.string(),
  envelopeFrom: z.string().nullable(),
  envelopeTo: z.array(z.string()),
  subject: z.string(),
  attachments: z.array(z.object({ filename: z.string().nullable(), contentType: z.string(), size: z.number() })),
});
type CaughtMessage = z.infer<typeof summarySchema>;

/** Catcher ids are a time stamp and a short random suffix; anything else is refused (no path tricks). */
const CAUGHT_ID = /^[0-9A-Za-z-]{10,80}$/;

function mailDir(): string {
  return path.resolve(config.mailCatcherDir());
}

export async function listCaughtMail(limit = 200): Promise<{ dir: string; messages: CaughtMessage[]; unreadable: number; missing: boolean }> {
  const dir = mailDir();
  let files: string[];
  try {
    files = await readdir(dir);
  } catch {
    return { dir, messages: [], unreadable: 0, missing: true };
  }
  const jsons = files.filter((f) => f.endsWith(".json")).sort().reverse().slice(0, limit);
  let unreadable = 0;
  const messages: CaughtMessage[] = [];
  for (const f of jsons) {
    try {
      const parsed = summarySchema.safeParse(JSON.parse(await readFile(path.join(dir, f), "utf8")));
      if (parsed.success && CAUGHT_ID.test(parsed.data.id)) messages.push(parsed.data);
      else unreadable++;
    } catch {
      unreadable++;
    }
  }
  return { dir, messages, unreadable, missing: false };
}

export async function readCaughtEml(id: string): Promise<Buffer | null> {
  if (!CAUGHT_ID.test(id)) return null;
  try {
    return await readFile(path.join(mailDir(), `${id}.eml`));
  } catch {
    return null;
  }
}
