import { describe, expect, it } from "vitest";
import { CAUTION_TEXT } from "@/lib/caution";
import { closedNoticeMail, leadTimeWords, oneLine, openPacketMail, reminderMail } from "./templates";

const ctx = {
  trialCode: "CRN-T9",
  trialTitle: "An invented trial <b>bold</b>",
  meetingWhen: "Tuesday 20 October 2026, 15:00 Europe/Oslo (UTC+02:00)",
  lookNumber: 2,
  recipientName: "Ada Example",
  senderName: "Cora Ordinator",
};

describe("openPacketMail", () => {
  const m = openPacketMail({ ...ctx, packetVersion: 3, attachmentName: "CRN-T9-open-report-v3.pdf" });
  it("says what it is in the subject: trial, open report, version, look", () => {
    expect(m.subject).toBe("[CRN-T9] DMC meeting packet, open report v3 (look 2)");
  });
  it("names the attachment, the meeting and carries the caution", () => {
    expect(m.text).toContain("attached as CRN-T9-open-report-v3.pdf (PDF)");
    expect(m.text).toContain(ctx.meetingWhen);
    expect(m.text).toContain(CAUTION_TEXT);
    expect(m.text).toContain("It holds no arm-level or outcome data.");
  });
  it("keeps a title with markup as literal text", () => {
    expect(m.text).toContain("An invented trial <b>bold</b>");
  });
});

describe("closedNoticeMail", () => {
  const m = closedNoticeMail({ ...ctx, packetVersion: 2, link: "http://localhost:3000/trials/4/meetings/9#packets" });
  it("links to the closed report instead of carrying it", () => {
    expect(m.subject).toBe("[CRN-T9] DMC meeting packet: closed report v2 ready in Cairn (look 2)");
    expect(m.text).toContain("Read it here: http://localhost:3000/trials/4/meetings/9#packets");
    expect(m.text).toContain("it is not attached");
    expect(m.text).toContain(CAUTION_TEXT);
  });
  it("has no slot for results: the body is the same whatever the closed data", () => {
    // Closed values with digits found nowhere else in the context, passed along by a careless caller.
    const closedData = { posteriorProbability: 0.9137, responders: 173, evaluable: 419, predictiveProbability: 0.0271 };
    const plain = closedNoticeMail({ ...ctx, packetVersion: 2, link: "L" });
    // @ts-expect-error the template's type has no field for closed data
    const careless = closedNoticeMail({ ...ctx, packetVersion: 2, link: "L", posteriorProbability: closedData.posteriorProbability, responders: closedData.responders });
    expect(closedNoticeMail({ ...ctx, ...closedData, packetVersion: 2, link: "L" })).toEqual(plain);
    expect(careless).toEqual(plain);
    for (const v of ["9137", "91.4", "173", "419", "0271", "2.7%"]) expect(careless.text).not.toContain(v);
    expect(m.text).not.toMatch(/posterior|responders|predictive probability/i);
  });

  it("reads no field but the meeting's open facts and the link", () => {
    const read = new Set<string>();
    const watched = new Proxy({ ...ctx, packetVersion: 2, link: "L", responders: 173 }, {
      get(target, key, receiver) {
        if (typeof key === "string") read.add(key);
        return Reflect.get(target, key, receiver);
      },
    });
    closedNoticeMail(watched);
    expect([...read].sort()).toEqual(["link", "lookNumber", "meetingWhen", "packetVersion", "recipientName", "senderName", "trialCode", "trialTitle"]);
  });
});

describe("reminderMail", () => {
  it("says it is a reminder, when, the real lead time, with the open agenda and the caution", () => {
    const m = reminderMail({ ...ctx, daysBefore: 1, msAhead: 26 * 3_600_000, link: "L", openAgenda: "1. Accrual" });
    expect(m.subject).toBe(`[CRN-T9] Reminder: DMC meeting on ${ctx.meetingWhen}`);
    expect(m.text).toContain("which starts in 1 day and 2 hours");
    expect(m.text).toContain("planned 1 day ahead");
    expect(m.text).toContain("1. Accrual");
    expect(m.text).toContain(CAUTION_TEXT);
    // Planned three days ahead but sent 20 hours before: the text says 20 hours, not three days.
    const late = reminderMail({ ...ctx, daysBefore: 3, msAhead: 20 * 3_600_000 + 59 * 60_000, link: "L", openAgenda: "" }).text;
    expect(late).toContain("which starts in 20 hours");
    expect(late).not.toContain("starts in 3 days");
  });
});

describe("leadTimeWords", () => {
  it("rounds down to whole hours and names days and hours", () => {
    const H = 3_600_000;
    expect(leadTimeWords(0)).toBe("within the hour");
    expect(leadTimeWords(H - 1)).toBe("within the hour");
    expect(leadTimeWords(H)).toBe("in 1 hour");
    expect(leadTimeWords(23 * H + 3_599_999)).toBe("in 23 hours");
    expect(leadTimeWords(24 * H)).toBe("in 1 day");
    expect(leadTimeWords(49 * H)).toBe("in 2 days and 1 hour");
    expect(leadTimeWords(-5 * H)).toBe("within the hour");
  });
});

describe("oneLine", () => {
  it("removes line breaks so a subject cannot inject a header", () => {
    expect(oneLine("Hello\r\nBcc: x@example.com")).toBe("Hello Bcc: x@example.com");
    expect(oneLine("a".repeat(300)).length).toBe(250);
  });
});
