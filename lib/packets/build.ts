/**
 * Assembles a packet document per audience. The open packet is built from open input alone; the
 * closed packet adds the closed part (and only a caller that passed the viewClosed check can hold
 * a ClosedPacketInput, because computing one needs the arm-level counts).
 */
import { CAUTION_TEXT } from "@/lib/caution";
import type { PacketDocument } from "./document";
import { buildOpenSections, meetingLabel, type OpenPacketInput } from "./open-content";
import { buildOpenPacket } from "./build-open";
import { buildClosedSections, type ClosedPacketInput } from "./closed-content";

export { buildOpenPacket };

/** The closed packet: the open report followed by the closed report, for the committee's full reading. */
export function buildClosedPacket(open: OpenPacketInput, closed: ClosedPacketInput): PacketDocument {
  return {
    audience: "closed",
    title: "Closed report",
    trialCode: open.trial.code,
    trialTitle: open.trial.title,
    meetingLabel: meetingLabel(open),
    caution: CAUTION_TEXT,
    sections: [...buildOpenSections(open), ...buildClosedSections(closed)],
  };
}
