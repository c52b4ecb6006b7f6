/**
 * Property-based bad input (fast-check) against the administrator's server actions: whatever the
 * payload, the action answers with a message (never throws a 500), and a refused payload writes nothing.
 */
import { beforeAll, describe, expect, it, vi } from "vitest";
import fc from "fast-check";
import { actAs, currentClaims, currentSession } from "./support/as-user";

vi.mock("@/lib/auth/session", () => ({ sessionUserId: vi.fn(async () => currentSession()?.user.id ?? null), sessionClaims: vi.fn(() => currentClaims()) }));
vi.mock("next/cache", () => ({ revalidatePath: vi.fn(), revalidateTag: vi.fn() }));
// Delivery is tested in mail.test.ts; here its background sweep would add audit rows mid-test.
vi.mock("@/lib/mail/delivery", () => ({ ensureMailWorker: vi.fn(), deliverWithRetries: vi.fn(async () => ({})), deliverAfterResponse: vi.fn() }));
// Hashing is not what is under test; a cheap stand-in keeps 1,000 runs quick.
vi.mock("bcryptjs", () => ({ default: { hash: async (p: string) => `test-hash:${p.length}`, compare: async () => false, hashSync: (p: string) => `test-hash:${p.length}` } }));

import { assignRole, createAccount, removeRole } from "@/app/admin/actions";
import { db, makeTrial, makeUser, resetDatabase } from "./support/db";

let adminId: number;
let trialId: number;

beforeAll(async () => {
  await resetDatabase();
  adminId = (await makeUser({ isAdmin: true })).id;
  trialId = await makeTrial();
});

const rowCount = async (t: string) => Number((await db(t).count({ n: "*" }).first())?.n);

function formOf(entries: Record<string, string>): FormData {
  const f = new FormData();
  for (const [k, v] of Object.entries(entries)) f.set(k, v);
  return f;
}

// Strings that break naive code: empty, long, HTML, SQL, unicode, control characters.
const nasty = fc.oneof(
  fc.string({ maxLength: 300 }),
  fc.constantFrom("", " ", "'; DROP TABLE users; --", "<script>alert(1)</script>", "a@b", "x".repeat(5000), "\u0000", "😀@😀.example", "null", "-1", "1e309"),
);

describe("createAccount with generated payloads", () => {
  it("never throws, and a refused payload creates no account", async () => {
    actAs(adminId);
    await fc.assert(
      fc.asyncProperty(fc.record({ name: nasty, email: fc.oneof(nasty, fc.emailAddress()), password: nasty, isAdmin: nasty }), async (payload) => {
        const before = await rowCount("users");
        const auditBefore = await rowCount("audit_events");
        const state = await createAccount({}, formOf(payload));
        expect(state.ok || state.error).toBeTruthy();
        const after = await rowCount("users");
        if (state.ok) {
          expect(after).toBe(before + 1);
          expect(await rowCount("audit_events")).toBe(auditBefore + 1);
        } else {
          expect(after).toBe(before);
          expect(await rowCount("audit_events")).toBe(auditBefore);
        }
      }),
      { numRuns: 1000 },
    );
  }, 300_000);
});

describe("assignRole and removeRole with generated payloads", () => {
  it("never throw, and refused payloads change no membership", async () => {
    actAs(adminId);
    const userId = (await makeUser()).id;
    await fc.assert(
      fc.asyncProperty(
        fc.record({
          userId: fc.oneof(nasty, fc.constant(String(userId)), fc.integer().map(String)),
          trialId: fc.oneof(nasty, fc.constant(String(trialId)), fc.integer().map(String)),
          role: fc.oneof(nasty, fc.constantFrom("sponsor", "dmc_member", "coordinator", "unblinded_statistician", "admin")),
        }),
        async (payload) => {
          const before = await rowCount("trial_memberships");
          const state = await assignRole({}, formOf(payload));
          expect(state.ok || state.error).toBeTruthy();
          expect(await rowCount("trial_memberships")).toBe(state.ok ? before + 1 : before);
        },
      ),
      { numRuns: 1000 },
    );
    await fc.assert(
      fc.asyncProperty(fc.record({ membershipId: nasty }), async (payload) => {
        const state = await removeRole({}, formOf(payload));
        expect(state.ok || state.error).toBeTruthy();
      }),
      { numRuns: 200 },
    );
  }, 300_000);

  it("a signed-out caller or a non-administrator gets a message and changes nothing", async () => {
    const before = await rowCount("users");
    actAs(null);
    expect((await createAccount({}, formOf({ name: "X", email: "x@test.example", password: "long-enough-pass" }))).error).toMatch(/Sign in/);
    actAs((await makeUser()).id);
    expect((await createAccount({}, formOf({ name: "X", email: "x@test.example", password: "long-enough-pass" }))).error).toMatch(/administrator/);
    expect(await rowCount("users")).toBe(before + 1); // only the makeUser above
  });
});
