import { describe, expect, it, vi } from "vitest";
import { z } from "zod";
import { redirect } from "next/navigation";
import { formAction, formError } from "./form-action";
import { HttpError } from "./http";
import { StatsDomainError } from "./stats/validate";

describe("formError: the same rules as errorResponse, as form state", () => {
  it("passes an HttpError's message through", () => {
    expect(formError(new HttpError(409, "Someone else changed this look."))).toEqual({ error: "Someone else changed this look." });
  });

  it("turns a zod error into field errors keyed by path", () => {
    const parsed = z.object({ rationale: z.string().min(3, "Write at least 3 characters."), n: z.number() }).safeParse({ rationale: "x", n: "a" });
    const state = formError(parsed.error);
    expect(state.error).toBe("Check 2 fields: Rationale: Write at least 3 characters. N: Enter a number.");
    expect(state.fieldErrors?.rationale).toEqual(["Write at least 3 characters."]);
    expect(state.fieldErrors?.n?.length).toBe(1);
  });

  it("keeps an engine message from a caller not known to be unblinded (blinded by default)", () => {
    const state = formError(new StatsDomainError("responders", 43, "must not exceed evaluable 40"));
    expect(state.error).not.toContain("43");
  });

  it("answers a lost database connection with a message that says nothing was saved", () => {
    expect(formError(Object.assign(new Error("connect ECONNREFUSED"), { code: "ECONNREFUSED" })).error).toMatch(/nothing was saved/);
  });

  it("hides an unexpected error's text behind a logged reference", () => {
    const log = vi.spyOn(console, "error").mockImplementation(() => {});
    const state = formError(new Error("SELECT secret FROM closed_table"));
    expect(state.error).toMatch(/reference [0-9a-f-]{36}/);
    expect(state.error).not.toContain("secret");
    expect(log).toHaveBeenCalledOnce();
    log.mockRestore();
  });

  it("lets Next's redirect through", () => {
    let thrown: unknown;
    try {
      redirect("/trials");
    } catch (e) {
      thrown = e;
    }
    expect(() => formError(thrown)).toThrow();
  });
});

describe("formError with fieldsBeside: a refusal naming a field is shown beside it", () => {
  it("maps an HttpError's details.field to that field, with the form's top line asking to check the fields", () => {
    const e = new HttpError(422, "Choose a time in the future.", { field: "scheduledLocal" });
    expect(formError(e, { fieldsBeside: true })).toEqual({ error: "Check the highlighted fields.", fieldErrors: { scheduledLocal: ["Choose a time in the future."] } });
    // Without the option (forms that show only a message) the message itself is the form's message.
    expect(formError(e)).toEqual({ error: "Choose a time in the future." });
  });

  it("leaves an HttpError without a field as the form's message", () => {
    expect(formError(new HttpError(409, "Only a scheduled meeting can be cancelled."), { fieldsBeside: true })).toEqual({ error: "Only a scheduled meeting can be cancelled." });
    expect(formError(new HttpError(409, "Refused.", { field: 3 }), { fieldsBeside: true })).toEqual({ error: "Refused." });
  });

  it("keys a zod error's sentences by the top-level field (a list's items under the list)", () => {
    const parsed = z.object({ ids: z.array(z.coerce.number().int("Choose a listed person.")), days: z.number().max(60, "Enter 0 to 60 days.") }).safeParse({ ids: ["1", "1.5"], days: "x" });
    const state = formError(parsed.error, { fieldsBeside: true });
    expect(state.error).toBe("Check the highlighted fields.");
    expect(state.fieldErrors).toEqual({ ids: ["Choose a listed person."], days: ["Enter a number."] });
  });
});

describe("formAction", () => {
  it("returns the action's own state when it succeeds, and the mapped error when it throws", async () => {
    const ok = formAction(async (n: number) => ({ ok: `saved ${n}` }));
    expect(await ok(2)).toEqual({ ok: "saved 2" });
    const failing = formAction(async () => {
      throw new HttpError(403, "Your role on this trial does not allow this.");
    });
    expect(await failing()).toEqual({ error: "Your role on this trial does not allow this." });
  });
});
