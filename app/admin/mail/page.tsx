import type { Metadata } from "next";
import { requirePageAdmin } from "@/lib/auth";
import { Card } from "@/components/ui/card";
import { Banner } from "@/components/ui/banner";
import { listCaughtMail } from "./caught";

export const metadata: Metadata = { title: "Caught e-mail" };
export const dynamic = "force-dynamic";

function size(n: number): string {
  return n < 1024 ? `${n} B` : n < 1024 * 1024 ? `${(n / 1024).toFixed(1)} KB` : `${(n / 1024 / 1024).toFixed(1)} MB`;
}

export default async function CaughtMailPage() {
  await requirePageAdmin();
  const { dir, messages, unreadable, missing } = await listCaughtMail();
  return (
    <div className="flex flex-col gap-4">
      <div>
        <h1>Caught e-mail</h1>
        <p className="text-sm text-stone-600">
          Messages received by the local mail catcher (development and tests). Nothing here left this machine. Folder: <code>{dir}</code>
        </p>
      </div>
      {missing ? <Banner tone="info">The mail catcher has not stored any message yet (its folder does not exist).</Banner> : null}
      {unreadable ? <Banner tone="warning">{unreadable} stored summaries could not be read and are not listed.</Banner> : null}
      <Card title={`Messages (${messages.length})`}>
        {messages.length === 0 ? (
          <p className="text-sm text-stone-600">No caught messages.</p>
        ) : (
          <table className="cairn-table" aria-label="Caught messages">
            <thead><tr><th>Received (UTC)</th><th>To</th><th>Subject</th><th>Attachments</th><th>Raw</th></tr></thead>
            <tbody>
              {messages.map((m) => (
                <tr key={m.id} data-testid="caught-message">
                  <td className="whitespace-nowrap">{m.receivedAt.slice(0, 19).replace("T", " ")}</td>
                  <td>{m.envelopeTo.join(", ")}</td>
                  <td>{m.subject}</td>
                  <td>
                    {m.attachments.length === 0 ? (
                      <span className="text-stone-500">none</span>
                    ) : (
                      <ul>
                        {m.attachments.map((a, i) => (
                          <li key={i}>{a.filename ?? "(no name)"} <span className="text-stone-500">· {a.contentType} · {size(a.size)}</span></li>
                        ))}
                      </ul>
                    )}
                  </td>
                  <td><a href={`/admin/mail/eml/${m.id}`} download>.eml</a></td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
      </Card>
    </div>
  );
}
