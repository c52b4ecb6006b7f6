import "server-only";
/**
 * Stores a packet document as a new version when its content changed. Shared by the open and the
 * closed packet; it takes a finished document and imports nothing that reads closed data.
 */
import { writeTransaction } from "@/db/knex";
import { appendAudit } from "@/db/audit";
import type { PacketAudience, PublicUser, TrialRow } from "@/db/types";
import { fetchLatestPacket, insertPacketVersion, lockMeetingRow } from "@/db/queries/packets";
import { ENGINE_VERSION } from "@/lib/stats/version";
import { packetContentHash, type PacketDocument } from "./document";
import { renderPacketPdf } from "./render-pdf";

export type GeneratedPacket = { audience: PacketAudience; packetId: number; version: number; created: boolean };

export async function storePacketIfChanged(trial: TrialRow, meetingId: number, doc: PacketDocument, user: PublicUser, now: Date): Promise<GeneratedPacket> {
  const contentHash = packetContentHash(doc, ENGINE_VERSION);
  const latest = await fetchLatestPacket(meetingId, doc.audience);
  if (latest && latest.content_hash === contentHash && latest.engine_version === ENGINE_VERSION)
    return { audience: doc.audience, packetId: latest.id, version: latest.version, created: false };
  // Rendering is the slow part: done before the transaction, which then only re-checks and inserts.
  const nextVersion = (latest?.version ?? 0) + 1;
  let rendered = await renderPacketPdf(doc, { version: nextVersion, contentHash, engineVersion: ENGINE_VERSION, generatedAt: now, generatedBy: user.name });
  return writeTransaction(async (tx) => {
    await lockMeetingRow(tx, meetingId);
    const again = await fetchLatestPacket(meetingId, doc.audience, tx);
    if (again && again.content_hash === contentHash && again.engine_version === ENGINE_VERSION)
      return { audience: doc.audience, packetId: again.id, version: again.version, created: false };
    if ((again?.version ?? 0) + 1 !== nextVersion)
      rendered = await renderPacketPdf(doc, { version: (again?.version ?? 0) + 1, contentHash, engineVersion: ENGINE_VERSION, generatedAt: now, generatedBy: user.name });
    const { id, version } = await insertPacketVersion(tx, { meetingId, audience: doc.audience, contentHash, engineVersion: ENGINE_VERSION, pdf: rendered.pdf, pageCount: rendered.pageCount, createdBy: user.id });
    await appendAudit(tx, {
      actorUserId: user.id,
      actorEmail: user.email,
      trialId: trial.id,
      action: "packet_generated",
      entityType: "packet",
      entityId: id,
      // The hash of a closed packet is derived from closed data (small counts could be guessed from it).
      visibility: doc.audience === "closed" ? "closed" : "open",
      newValues: { meetingId, audience: doc.audience, version, contentHash, engineVersion: ENGINE_VERSION, pages: rendered.pageCount },
    });
    return { audience: doc.audience, packetId: id, version, created: true };
  });
}

