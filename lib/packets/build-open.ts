/** The open packet document: open input alone (kept apart from the closed part, which build.ts adds). */
import { CAUTION_TEXT } from "@/lib/caution";
import type { PacketDocument } from "./document";
import { buildOpenSections, meetingLabel, type OpenPacketInput } from "./open-content";

export function buildOpenPacket(open: OpenPacketInput): PacketDocument {
  return {
    audience: "open",
    title: "Open report",
    trialCode: open.trial.code,
    trialTitle: open.trial.title,
    meetingLabel: meetingLabel(open),
    caution: CAUTION_TEXT,
    sections: buildOpenSections(open),
  };
}
