import { z } from "zod";

const id = (msg: string) => z.coerce.number({ message: msg }).int(msg).positive(msg).max(2_147_483_647, msg);

/** The closed-packet form: the meeting must review the look whose closed review posts it. */
export const closedPacketRefSchema = z.object({ trialId: id("Unknown trial."), analysisId: id("Unknown look."), meetingId: id("Choose the meeting the closed report is for.") });
