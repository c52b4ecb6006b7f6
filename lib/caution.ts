/** The caution every trial page, packet and e-mail carries (product brief, "Cautions"). */
export const CAUTION_TEXT =
  "Decision support only. Stopping, continuing or changing a trial is decided by the DMC under its charter, the protocol, and the applicable regulations and ethics approvals, not by Cairn.";
