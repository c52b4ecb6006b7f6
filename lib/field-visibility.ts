/**
 * What a free-text field's reader will be, said beside the field. The classification itself is
 * db/classification.ts (FREE_TEXT); these are the words a form shows for an open or a closed field,
 * so a statistician never types closed detail into a field that blinded roles read.
 */
export const CLOSED_FIELD_NOTE = "Closed: only the DMC and the unblinded statistician read this (closed audit entry).";
export const OPEN_FIELD_NOTE = "Open: blinded roles (sponsor, coordinator, administrator) will read this. Write no arm-level or outcome detail here.";
