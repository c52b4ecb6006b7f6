/**
 * Values of the matrix fixture (matrix-fixture.ts) that the tests also need, kept apart so the
 * Playwright side can import them without touching the database modules.
 */

/** An account on no trial: the matrix's "outsider" column. Invented. */
export const OUTSIDER = { email: "outsider@fixture.example", password: "fixture-outsider-pass", name: "Pell Ardenne-Cho" } as const;

/**
 * The fixture's closed data: numbers chosen to appear nowhere in the demo scenario or the design
 * (31 responders of 43 evaluable, 11 toxicities, 47 enrolled) and a rationale with a made-up word
 * pair, so a marker found in a blinded body is a leak, not a coincidence.
 */
export const FIXTURE_CLOSED = {
  enrolled: 47,
  evaluable: 43,
  responders: 31,
  toxicities: 11,
  rationale: "Sentinel marram-kestrel rationale for the matrix fixture; continue as planned.",
} as const;
