/**
 * The authorization matrix: every page and route of the app (rows) by role (columns), with the
 * status each role must get. tests/e2e/blinding-matrix.spec.ts requests every cell and, for the
 * blinded roles, also checks that no outcome data is in the body.
 *
 * Placeholders, resolved at run time from the seeded demo data: {trial} = CRN-201, {analysis} =
 * its look 2 (locked, with counts), {arm} = its single arm. Status 307 for an anonymous page
 * request is the redirect to /signin; APIs answer 401.
 *
 * The columns restate the product brief's permission table (not lib/auth/permissions.ts):
 * closed results for the unblinded statistician and DMC members only; data entry for the
 * statistician only; open status and the open audit trail for everyone on the trial; account
 * management for the administrator, who stays blinded.
 */
export const ROLES = ["admin", "statistician", "dmc", "sponsor", "coordinator", "anonymous"] as const;
export type MatrixRole = (typeof ROLES)[number];

/** Roles that must never receive arm-level or outcome data. */
export const BLINDED_ROLES: readonly MatrixRole[] = ["admin", "sponsor", "coordinator", "anonymous"];

/** Expected HTTP status, or null when the cell is deliberately not requested (it would change data). */
export type Cell = number | null;

export type MatrixRow = {
  method: "GET" | "POST";
  path: string;
  kind: "page" | "api";
  expect: Record<MatrixRole, Cell>;
  body?: unknown;
  /** The page or route does not exist yet; the test is marked fixme until it does. */
  pending?: boolean;
};

const everyone = (anonymous: number): Record<MatrixRole, Cell> => ({ admin: 200, statistician: 200, dmc: 200, sponsor: 200, coordinator: 200, anonymous });
const unblindedOnly = (anonymous: number): Record<MatrixRole, Cell> => ({ admin: 403, statistician: 200, dmc: 200, sponsor: 403, coordinator: 403, anonymous });
const statisticianOnly = (anonymous: number): Record<MatrixRole, Cell> => ({ admin: 403, statistician: 200, dmc: 403, sponsor: 403, coordinator: 403, anonymous });
const adminOnly = (anonymous: number): Record<MatrixRole, Cell> => ({ admin: 200, statistician: 403, dmc: 403, sponsor: 403, coordinator: 403, anonymous });

const page = (path: string, expect: Record<MatrixRole, Cell>, extra: Partial<MatrixRow> = {}): MatrixRow => ({ method: "GET", path, kind: "page", expect, ...extra });
const api = (path: string, expect: Record<MatrixRole, Cell>, extra: Partial<MatrixRow> = {}): MatrixRow => ({ method: "GET", path, kind: "api", expect, ...extra });

export const AUTHORIZATION_MATRIX: MatrixRow[] = [
  // Pages
  page("/trials", everyone(307)),
  page("/trials/new", { admin: 200, statistician: 200, dmc: 403, sponsor: 403, coordinator: 403, anonymous: 307 }),
  page("/trials/{trial}", everyone(307)),
  page("/trials/{trial}/design", everyone(307)),
  page("/trials/{trial}/analyses", statisticianOnly(307)),
  page("/trials/{trial}/analyses/{analysis}", statisticianOnly(307)),
  page("/trials/{trial}/review", unblindedOnly(307)),
  page("/trials/{trial}/review/{analysis}", unblindedOnly(307)),
  page("/trials/{trial}/audit", everyone(307)),
  page("/trials/{trial}/meetings", everyone(307)),
  page("/admin", adminOnly(307)),
  page("/admin/mail", adminOnly(307)),
  page("/account", everyone(307)),
  // Public: the one-time token in the link's fragment is the credential, checked when the form is sent.
  page("/set-password", everyone(200)),
  // Route handlers (GET)
  api("/api/trials/{trial}/open-status", everyone(401)),
  api("/api/trials/{trial}/designs", everyone(401)),
  api("/api/trials/{trial}/analyses", everyone(401)),
  api("/api/trials/{trial}/analyses/{analysis}", everyone(401)),
  api("/api/trials/{trial}/analyses/{analysis}/patients", unblindedOnly(401)),
  api("/api/trials/{trial}/analyses/{analysis}/review", unblindedOnly(401)),
  api("/api/trials/{trial}/analyses/{analysis}/review/export", unblindedOnly(401)),
  api("/api/trials/{trial}/analyses/{analysis}/interval?arm={arm}&lo=0.2&hi=0.4", unblindedOnly(401)),
  api("/api/trials/{trial}/analyses/{analysis}/recommendations", unblindedOnly(401)),
  api("/api/trials/{trial}/audit", everyone(401)),
  // Writes that must be refused before anything is read (the DMC member's own write is exercised in review.spec.ts)
  {
    method: "POST",
    path: "/api/trials/{trial}/analyses/{analysis}/recommendations",
    kind: "api",
    body: { decision: "stop_efficacy", rationale: "Matrix probe: must be refused for this role.", password: "not-the-password" },
    expect: { admin: 403, statistician: 403, dmc: null, sponsor: 403, coordinator: 403, anonymous: 401 },
  },
  // The switch to count-level entry: the statistician reaches the service, which refuses it on a locked look (409, nothing changes).
  {
    method: "POST",
    path: "/api/trials/{trial}/analyses/{analysis}/count-level",
    kind: "api",
    body: { rowVersion: 1, reason: "Matrix probe: must change nothing for any role." },
    expect: { admin: 403, statistician: 409, dmc: 403, sponsor: 403, coordinator: 403, anonymous: 401 },
  },
];

/**
 * Outcome data of the demo scenario (db/seeds/demo.ts DEMO_COUNTS and the seeded rationale) that a
 * blinded body must never contain: JSON keys of closed results (plain or escaped inside an RSC
 * payload), responder counts as the screens write them, and the closed rationale's words.
 */
const CLOSED_KEYS = [
  "responders",
  "respondersT",
  "respondersC",
  "respondersControl",
  "evaluable",
  "toxicities",
  "predictiveProbability",
  "posteriorProbabilitySuccess",
  "posteriorProbabilityMonitoring",
  "safetyProbability",
  "posterior",
  "hpd",
  "equalTailed",
  "probAboveP0",
  "probExceeds",
  "probAboveLimit",
  "observedPath",
  "clopperPearson",
  "rationale",
];

export const OUTCOME_MARKERS: { name: string; pattern: RegExp }[] = [
  ...CLOSED_KEYS.map((k) => ({ name: `key "${k}"`, pattern: new RegExp(`\\\\?"${k}\\\\?"\\s*:`) })),
  // CRN-201 looks 1 and 2, CRN-305 look 1 (experimental 9 of 20, control 5 of 20), as screens write counts.
  ...["3 / 10", "6 / 20", "9 / 20", "5 / 20", "3 of 10", "6 of 20", "9 of 20", "5 of 20"].map((s) => ({ name: `count "${s}"`, pattern: new RegExp(s.replace(/\//g, "\\/")) })),
  { name: "toxicity count sentence", pattern: /\b[0-9]+ toxicities in [0-9]+ patients\b/ },
  { name: "seeded rationale", pattern: /well above the futility threshold/ },
  { name: "posterior summary heading", pattern: /Posterior response rate|Predictive probability of success \d|HPD/ },
];

export function findOutcomeData(body: string): string[] {
  return OUTCOME_MARKERS.filter((m) => m.pattern.test(body)).map((m) => m.name);
}
