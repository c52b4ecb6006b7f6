import { describe, expect, it } from "vitest";
import { actionWords, actorWords, changeWords, keyWords, recordWords, valueWords } from "./audit-words";

describe("audit trail in words", () => {
  it("names actions and records in plain words, with a readable fallback for names not listed", () => {
    expect(actionWords("recommendation_recorded")).toBe("Recommendation recorded");
    expect(actionWords("analysis_locked")).toBe("Look locked");
    expect(actionWords("some_new_thing")).toBe("Some new thing");
    expect(recordWords("trial_membership")).toBe("Role on trial");
    expect(recordWords("calibration_job")).toBe("Calibration job");
  });

  it("shows the demo seed's actor as demo data, people by their address", () => {
    expect(actorWords("demo-seed")).toBe("demo data");
    expect(actorWords("dmc@cairn.example")).toBe("dmc@cairn.example");
    expect(actorWords(null)).toBe("Cairn");
  });

  it("writes keys and values as text", () => {
    expect(keyWords("signatureId")).toBe("Signature id");
    expect(keyWords("review_version")).toBe("Review version");
    expect(valueWords(null)).toBe("none");
    expect(valueWords(true)).toBe("yes");
    expect(valueWords(["a", 2])).toBe("a, 2");
    expect(valueWords({ id: 3, email: "x@y" })).toBe("(id 3, email x@y)");
  });

  it("shows old → new for a field present on both sides, and the side present otherwise", () => {
    expect(changeWords({ status: "planned", isActive: true }, { status: "locked", version: 2 })).toEqual(["Status: planned → locked", "Is active: yes (before)", "Version: 2"]);
    expect(changeWords(null, { role: "sponsor" })).toEqual(["Role: sponsor"]);
    expect(changeWords(null, null)).toEqual([]);
    expect(changeWords("a", "b")).toEqual(["Value: a → b"]);
  });
});
