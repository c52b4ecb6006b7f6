import { describe, expect, it } from "vitest";
import betaCdf from "@stdlib/stats-base-dists-beta-cdf";
import { computeReview, reproducibilityRecord, type ReviewInput } from "@/lib/review/compute-review";
import type { SingleArmDesign } from "@/lib/stats/types";
import { CAUTION_TEXT } from "@/lib/caution";
import { buildClosedPacket, buildOpenPacket } from "./build";
import { documentText, packetContentHash, pdfSafeText, type PacketChart } from "./document";
import type { OpenPacketInput } from "./open-content";
import type { ClosedPacketInput } from "./closed-content";
import { niceTicks } from "./render-pdf";
import { SINGLE_ARM_DEMO_DESIGN } from "@/db/seeds/demo-designs";

// The demo trial's design: Beta(0.6, 0.4) prior, p0 = 0.2, nMax = 40, looks at 10/20/30/40,
// predictive rule thetaT = 0.9, thetaL = 0.05, safety qmax = 0.3.
const design: SingleArmDesign = SINGLE_ARM_DEMO_DESIGN;

function openInput(over: Partial<OpenPacketInput["trial"]> = {}): OpenPacketInput {
  return {
    trial: { code: "CRN-T1", title: "An invented test trial", sponsorName: "Invented sponsor", phase: "II", designType: "single", endpointName: "Response", targetEnrolment: 44, firstPatientOn: "2026-03-02", ...over },
    meeting: { scheduledAt: new Date("2026-10-20T13:00:00Z"), timeZone: "Europe/Oslo", openAgenda: "1. Accrual\n2. Timeliness", lookNumber: 2, attendees: [{ name: "A. Member", roles: ["DMC member"] }] },
    looks: [
      { lookNumber: 1, plannedN: 10, cutoffDate: "2026-06-30", enrolledTotal: 11, status: "reviewed", lockedAt: new Date("2026-07-06T10:00:00Z") },
      { lookNumber: 2, plannedN: 20, cutoffDate: "2026-09-30", enrolledTotal: 21, status: "locked", lockedAt: new Date("2026-10-05T10:00:00Z") },
      { lookNumber: 3, plannedN: 30, cutoffDate: null, enrolledTotal: null, status: "planned", lockedAt: null },
    ],
    recommendations: [{ lookNumber: 1, decision: "continue", recordedAt: new Date("2026-07-14T15:00:00Z"), signerName: "A. Member", correctsId: null }],
    caution: CAUTION_TEXT,
  };
}

function reviewInput(respondersLook2 = 6): ReviewInput {
  return {
    design,
    arms: [{ id: 7, label: "Invented arm", role: "single" }],
    looks: [
      { analysisId: 1, lookNumber: 1, cutoffDate: "2026-06-30", counts: [{ armId: 7, enrolled: 11, treated: 10, evaluable: 10, responders: 3, toxicities: 1 }] },
      { analysisId: 2, lookNumber: 2, cutoffDate: "2026-09-30", counts: [{ armId: 7, enrolled: 21, treated: 20, evaluable: 20, responders: respondersLook2, toxicities: 3 }] },
    ],
    analysisId: 2,
    generatedAt: "2026-10-18T09:00:00Z",
  };
}

function closedInput(respondersLook2 = 6): ClosedPacketInput {
  const input = reviewInput(respondersLook2);
  const review = computeReview(input);
  return {
    review,
    record: reproducibilityRecord(input, review),
    closedAgenda: "Closed discussion of look 2",
    design: { id: 3, version: 1, lockedAt: new Date("2026-03-01T09:00:00Z"), ruleLabel: "predictive" },
    lock: { signedBy: "I. Statistician", lockedAt: new Date("2026-10-05T10:00:00Z") },
  };
}

describe("finding 1: the closed packet with toxicities above the patients evaluable for response", () => {
  it("builds, states the treated denominator, and its safety probability matches @stdlib's Beta CDF with treated as n", () => {
    const input = reviewInput();
    input.looks[1].counts[0] = { armId: 7, enrolled: 21, treated: 21, evaluable: 15, responders: 4, toxicities: 16 };
    const review = computeReview(input);
    const doc = buildClosedPacket(openInput(), { ...closedInput(), review, record: reproducibilityRecord(input, review) });
    const text = documentText(doc);
    expect(text).toContain("16 of 21 treated patients (evaluable for toxicity)");
    expect(text).toContain("Treated (evaluable for toxicity)");
    expect(Math.abs(review.safety!.probAboveLimit - (1 - betaCdf(0.3, 16.6, 6.4)))).toBeLessThan(1e-12);
  });
});

describe("open packet content", () => {
  it("holds the open sections only, the caution, and no arm-level count", () => {
    const doc = buildOpenPacket(openInput());
    expect(doc.audience).toBe("open");
    expect(doc.sections.map((s) => s.id)).toEqual(["open-about", "open-agenda", "open-accrual", "open-looks", "open-timeliness", "open-recommendations"]);
    expect(doc.sections.every((s) => s.part === "open")).toBe(true);
    const text = documentText(doc);
    expect(text).toContain(CAUTION_TEXT);
    expect(text).toContain("21 of 44 planned (47.7%)");
    expect(text).not.toMatch(/Responders|Posterior|Predictive probability|closed session agenda/i);
  });

  it("computes timeliness in calendar days (30 Sep to 5 Oct is 5; to the 20 Oct meeting is 20)", () => {
    const t = buildOpenPacket(openInput()).sections.find((s) => s.id === "open-timeliness")!;
    const table = t.blocks[0];
    expect(table.kind).toBe("table");
    if (table.kind === "table") expect(table.rows[1]).toEqual(["2", "30 Sep 2026", "5", "20"]);
  });
});

describe("closed packet content", () => {
  it("adds every closed section after the open ones", () => {
    const doc = buildClosedPacket(openInput(), closedInput());
    expect(doc.sections.filter((s) => s.part === "closed").map((s) => s.id)).toEqual([
      "closed-agenda",
      "closed-counts",
      "closed-posteriors",
      "closed-predictive",
      "closed-boundaries",
      "closed-safety",
      "closed-sensitivity",
      "closed-decision",
      "closed-reproducibility",
    ]);
  });

  it("reports P(p > p0 | data) equal to the reference Beta CDF of @stdlib (Beta(0.6 + 6, 0.4 + 14) at 0.2)", () => {
    const doc = buildClosedPacket(openInput(), closedInput());
    const posteriors = doc.sections.find((s) => s.id === "closed-posteriors")!;
    const table = posteriors.blocks.find((b) => b.kind === "table");
    const expected = (1 - betaCdf(0.2, 6.6, 14.4)).toFixed(3);
    expect(table && table.kind === "table" ? table.rows[0][6] : null).toBe(expected);
  });

  it("draws the boundary chart from the review's boundary rows and observed path", () => {
    const input = closedInput();
    const doc = buildClosedPacket(openInput(), input);
    const chart = doc.sections.find((s) => s.id === "closed-boundaries")!.blocks.find((b) => b.kind === "chart") as { chart: PacketChart };
    const fut = chart.chart.series.find((s) => s.name.startsWith("Futility"))!;
    expect(fut.points).toEqual(input.review.boundaries.filter((b) => b.futilityMax !== null).map((b) => [b.n, b.futilityMax]));
    const observed = chart.chart.series.find((s) => s.name === "Observed looks")!;
    expect(observed.points).toEqual([[10, 3], [20, 6]]);
  });

  it("draws the posterior density from the review's curve points", () => {
    const input = closedInput();
    const doc = buildClosedPacket(openInput(), input);
    const chart = doc.sections.find((s) => s.id === "closed-posteriors")!.blocks.find((b) => b.kind === "chart") as { chart: PacketChart };
    const arm = input.review.arms[0];
    const finite = arm.curves.p.map((p, k) => [p, arm.curves.density[k]]).filter(([, d]) => d !== null && Number.isFinite(d));
    expect(chart.chart.series[0].points).toEqual(finite);
  });
});

describe("content hash", () => {
  it("is the same for the same content and changes when the data change", () => {
    const a = packetContentHash(buildClosedPacket(openInput(), closedInput(6)), "1.0.0");
    const b = packetContentHash(buildClosedPacket(openInput(), closedInput(6)), "1.0.0");
    const c = packetContentHash(buildClosedPacket(openInput(), closedInput(7)), "1.0.0");
    const d = packetContentHash(buildClosedPacket(openInput(), closedInput(6)), "1.0.1");
    expect(a).toMatch(/^[0-9a-f]{64}$/);
    expect(b).toBe(a);
    expect(c).not.toBe(a);
    expect(d).not.toBe(a);
  });
});

describe("pdfSafeText", () => {
  it("keeps markup literal and spells out characters Helvetica cannot encode", () => {
    expect(pdfSafeText("<b>Trial</b> & <script>x</script>")).toBe("<b>Trial</b> & <script>x</script>");
    expect(pdfSafeText("P ≤ θ − δ")).toBe("P <= theta - delta");
    expect(pdfSafeText("Zoë – 5 µg")).toBe("Zoë – 5 µg");
    expect(pdfSafeText("a\u0000b漢")).toBe("ab?");
  });
});

describe("niceTicks", () => {
  it("steps by 1, 2 or 5 times a power of ten and covers the range", () => {
    expect(niceTicks(0, 40)).toEqual([0, 10, 20, 30, 40]);
    expect(niceTicks(0, 1)).toEqual([0, 0.2, 0.4, 0.6, 0.8, 1]);
    expect(niceTicks(0, 7)).toEqual([0, 2, 4, 6]);
  });
});
