/** The committee's input rules: bad input is refused with the message the form shows beside the field. */
import { describe, expect, it } from "vitest";
import { addMemberSchema, declarationSchema, minutesDraftSchema, quorumSchema, voteSchema } from "./schemas";

const messages = (r: { success: boolean; error?: { issues: { path: PropertyKey[]; message: string }[] } }) =>
  Object.fromEntries((r.error?.issues ?? []).map((i) => [i.path.join("."), i.message]));

describe("committee input", () => {
  it("an empty vote names the missing choice and the password", () => {
    expect(messages(voteSchema.safeParse({ meetingId: "4", decision: "", password: "" }))).toEqual({ decision: "Choose your vote.", password: "Enter your password to sign." });
    expect(voteSchema.parse({ meetingId: "4", decision: "stop_safety", password: "x" })).toEqual({ meetingId: 4, decision: "stop_safety", comment: "", password: "x" });
    expect(voteSchema.safeParse({ meetingId: "4", decision: "stop_for_fun", password: "x" }).success).toBe(false);
  });

  it("minutes need text (whitespace is not text)", () => {
    expect(messages(minutesDraftSchema.safeParse({ meetingId: 1, session: "open", body: "        " }))).toEqual({ body: "Write the minutes (at least 10 characters)." });
    expect(minutesDraftSchema.parse({ meetingId: 1, session: "closed", body: "  Ten chars!  ", rowVersion: "" })).toEqual({ meetingId: 1, session: "closed", body: "Ten chars!", rowVersion: null });
    expect(minutesDraftSchema.safeParse({ meetingId: 1, session: "both", body: "Long enough text" }).success).toBe(false);
  });

  it("a declared conflict must be stated; 'no new conflicts' needs no statement", () => {
    expect(messages(declarationSchema.safeParse({ meetingId: 1, hasConflict: "yes", statement: " ", password: "p" }))).toEqual({ statement: "State the conflict (at least 5 characters)." });
    expect(declarationSchema.safeParse({ meetingId: 1, hasConflict: "no", password: "p" }).success).toBe(true);
    expect(messages(declarationSchema.safeParse({ meetingId: 1, password: "p" }))).toEqual({ hasConflict: "Say whether you have a new conflict of interest." });
  });

  it("a seat needs a person and a place; the quorum is a whole number from 1", () => {
    expect(Object.keys(messages(addMemberSchema.safeParse({})))).toEqual(["userId", "role"]);
    expect(addMemberSchema.safeParse({ userId: "7", role: "co-chair" }).success).toBe(false);
    expect(messages(quorumSchema.safeParse({ quorum: "0" }))).toEqual({ quorum: "The quorum is at least 1 voting member." });
    expect(messages(quorumSchema.safeParse({ quorum: "2.5" }))).toEqual({ quorum: "Give the quorum as a whole number." });
    expect(quorumSchema.parse({ quorum: "3" })).toEqual({ quorum: 3 });
  });
});
