/**
 * The local mail catcher for development and tests: an SMTP server on loopback (smtp-server) that
 * accepts every message and stores it on disk as .eml plus a parsed .json summary (mailparser).
 * Nothing leaves the machine. Usage: tsx scripts/mail-catcher.ts [--port 2525] [--dir .data/mail]
 */
import { SMTPServer } from "smtp-server";
import { simpleParser } from "mailparser";
import { mkdir, writeFile } from "node:fs/promises";
import path from "node:path";
import { randomUUID } from "node:crypto";

function arg(name: string, fallback: string): string {
  const i = process.argv.indexOf(`--${name}`);
  return i >= 0 && process.argv[i + 1] ? process.argv[i + 1] : fallback;
}

const port = Number(arg("port", process.env.SMTP_PORT ?? "2525"));
const dir = path.resolve(arg("dir", process.env.CAIRN_MAIL_DIR ?? ".data/mail"));
await mkdir(dir, { recursive: true });

const server = new SMTPServer({
  authOptional: true,
  disabledCommands: ["STARTTLS"],
  size: 25 * 1024 * 1024,
  banner: "Cairn local mail catcher",
  onData(stream, session, callback) {
    const chunks: Buffer[] = [];
    stream.on("data", (c: Buffer) => chunks.push(c));
    stream.on("end", async () => {
      try {
        const raw = Buffer.concat(chunks);
        const parsed = await simpleParser(raw);
        const id = `${new Date().toISOString().replace(/[:.]/g, "-")}-${randomUUID().slice(0, 8)}`;
        await writeFile(path.join(dir, `${id}.eml`), raw);
        const summary = {
          id,
          receivedAt: new Date().toISOString(),
          envelopeFrom: session.envelope.mailFrom ? session.envelope.mailFrom.address : null,
          envelopeTo: session.envelope.rcptTo.map((r) => r.address),
          subject: parsed.subject ?? "",
          text: parsed.text ?? "",
          attachments: parsed.attachments.map((a) => ({ filename: a.filename ?? null, contentType: a.contentType, size: a.size })),
        };
        await writeFile(path.join(dir, `${id}.json`), JSON.stringify(summary, null, 2));
        callback();
      } catch (e) {
        callback(e as Error);
      }
    });
  },
});

server.listen(port, "127.0.0.1", () => console.log(`mail catcher listening on 127.0.0.1:${port}, storing in ${dir}`));
const stop = () => server.close(() => process.exit(0));
process.on("SIGTERM", stop);
process.on("SIGINT", stop);
