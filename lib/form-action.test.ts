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
