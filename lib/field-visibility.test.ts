/**
 * Every form that writes free text says beside the field who will read it: the closed fields
 * (db/classification.ts marks them "closed", or the service writes them only to closed audit rows)
 * carry CLOSED_FIELD_NOTE, the open ones OPEN_FIELD_NOTE. Read from the component sources, so a new
 * free-text field on these forms without its note fails here.
 */
import { readFileSync } from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { FREE_TEXT } from "@/db/classification";

const ROOT = path.resolve(import.meta.dirname, "..");
const source = (f: string) => readFileSync(path.join(ROOT, f), "utf8");

/** Each form's free-text field (its `name`), where it is stored, and the note it must show. */
const FIELDS: Array<{ file: string; name: string; stored: string; note: "CLOSED_FIELD_NOTE" | "OPEN_FIELD_NOTE" }> = [
  { file: "components/review/recommendation-form.tsx", name: "rationale", stored: "recommendations.rationale", note: "CLOSED_FIELD_NOTE" },
  { file: "components/review/reopen-review-form.tsx", name: "reason", stored: "analyses.reopen_reason", note: "CLOSED_FIELD_NOTE" },
  { file: "components/design/design-studio.tsx", name: "amend-reason", stored: "designs.amendment_reason", note: "OPEN_FIELD_NOTE" },
];

describe("free-text fields say who reads them", () => {
  it.each(FIELDS)("$file: the $name field shows the note its classification asks for", ({ file, name, stored, note }) => {
    expect(FREE_TEXT[stored]).toBe(note === "CLOSED_FIELD_NOTE" ? "closed" : "open");
    const field = source(file)
      .split("<Field ")
      .find((chunk) => chunk.includes(`name="${name}"`));
    expect(field, `a <Field name="${name}"> in ${file}`).toBeDefined();
    expect(field!.slice(0, field!.indexOf(">"))).toContain(note);
  });

  it("the data-entry reasons (counts changed, look reopened, switch to count-level) are written to closed audit rows and say so", () => {
    const fields = source("components/analyses/look-forms.tsx")
      .split("<Field ")
      .filter((chunk) => chunk.includes('name="reason"'));
    expect(fields).toHaveLength(3);
    for (const f of fields) expect(f.slice(0, f.indexOf(">"))).toContain("CLOSED_FIELD_NOTE");
  });

  it("the meeting agendas: the open one warns, the closed one says it is closed", () => {
    const s = source("components/meetings/forms.tsx");
    expect(FREE_TEXT["meetings.open_agenda"]).toBe("open");
    expect(FREE_TEXT["meetings.closed_agenda"]).toBe("closed");
    expect(s).toMatch(/name="openAgenda"[^>]*hint="Open: blinded roles/);
    expect(s).toMatch(/name="closedAgenda"[^>]*hint="Closed: only the DMC/);
  });
});
