/**
 * Who may download a packet: the open report goes to everyone on the trial (viewOpen); the
 * closed report only to those who may see closed results (viewClosed). Pure, so the rule is
 * tested apart from the session.
 */
import { allows, type Principal } from "@/lib/auth/permissions";
import type { PacketAudience } from "@/db/types";

export function mayDownloadPacket(p: Principal, audience: PacketAudience): boolean {
  return allows(p, audience === "closed" ? "viewClosed" : "viewOpen");
}
