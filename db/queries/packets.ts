import "server-only";
/**
 * Meeting packets. Listings select metadata only; the PDF bytes are read by one function, called
 * only by the download route after it has checked the audience against the caller's roles.
 */
import { db, type Tx } from "../knex";
import type { PacketAudience, PacketMetaRow, PacketRow } from "../types";

const PACKET_META_COLUMNS = ["id", "meeting_id", "version", "audience", "content_hash", "engine_version", "page_count", "byte_size", "created_at", "created_by"] as const;

export async function fetchPackets(meetingId: number, audiences: PacketAudience[], tx: Tx = db): Promise<PacketMetaRow[]> {
  if (audiences.length === 0) return [];
  return tx("packets").where({ meeting_id: meetingId }).whereIn("audience", audiences).select(PACKET_META_COLUMNS).orderBy([{ column: "audience", order: "desc" }, { column: "version", order: "desc" }]);
}

export async function fetchLatestPacket(meetingId: number, audience: PacketAudience, tx: Tx = db): Promise<PacketMetaRow | undefined> {
  return tx("packets").where({ meeting_id: meetingId, audience }).orderBy("version", "desc").first(PACKET_META_COLUMNS);
}

export async function fetchPacketMeta(packetId: number, tx: Tx = db): Promise<PacketMetaRow | undefined> {
  return tx("packets").where({ id: packetId }).first(PACKET_META_COLUMNS);
}

/** The PDF bytes. Callers must have checked the packet's audience against the caller first. */
export async function fetchPacketPdf(packetId: number, tx: Tx = db): Promise<PacketRow | undefined> {
  return tx<PacketRow>("packets").where({ id: packetId }).first();
}

/** Inserts the next version for (meeting, audience). Call inside a transaction that locks the meeting row. */
export async function insertPacketVersion(
  tx: Tx,
  p: { meetingId: number; audience: PacketAudience; contentHash: string; engineVersion: string; pdf: Buffer; pageCount: number; createdBy: number | null },
): Promise<{ id: number; version: number }> {
  const last = await tx("packets").where({ meeting_id: p.meetingId, audience: p.audience }).max({ v: "version" }).first();
  const version = Number(last?.v ?? 0) + 1;
  const [id] = await tx("packets").insert({
    meeting_id: p.meetingId,
    version,
    audience: p.audience,
    content_hash: p.contentHash,
    engine_version: p.engineVersion,
    page_count: p.pageCount,
    byte_size: p.pdf.length,
    pdf: p.pdf,
    created_by: p.createdBy,
  });
  return { id, version };
}

/** Open facts about an analysis lock: who signed and when (no counts). */
export async function fetchAnalysisLockSigner(analysisId: number, tx: Tx = db): Promise<{ signerName: string | null; lockedAt: Date | null; designId: number } | undefined> {
  return tx("analyses as a")
    .leftJoin("signatures as s", "s.id", "a.lock_signature_id")
    .where("a.id", analysisId)
    .first("s.signer_name as signerName", "a.locked_at as lockedAt", "a.design_id as designId");
}

/** Locks the meeting row so concurrent generations of the same meeting queue instead of racing for a version number. */
export async function lockMeetingRow(tx: Tx, meetingId: number): Promise<void> {
  await tx("meetings").where({ id: meetingId }).forUpdate().first("id");
}
