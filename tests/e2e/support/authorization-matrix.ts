/**
 * The authorization matrix: every page, every route handler method and every server action of the
 * app (rows) by role (columns), with what each role must get. tests/e2e/blinding-matrix.spec.ts
 * requests every cell on each trial the row applies to (the single-arm demo trial CRN-201, the
 * two-arm demo trial CRN-305, and the matrix's own fixture trial, see matrix-fixture.ts) and, for
 * the blinded roles, checks that no closed data is in the body or in the page's RSC payload.
 * tests/matrix/authorization-matrix-coverage.test.ts fails when the app has a page, method or
 * action without a row here. How to add a row: DEVELOPERS.md, "an authorization-matrix row".
 *
 * Placeholders, resolved per trial at run time: {trial}; {analysis} = a locked look with counts
 * (CRN-201 look 2, CRN-305 look 1, the fixture's look 1); {arm} = its first arm; {design} = its
 * latest design version; {meeting}, {packetOpen}, {packetClosed} exist on the fixture trial only
 * (a row using them runs there). Rows without {trial} run once.
 *
 * The columns restate the product brief's permission table (not lib/auth/permissions.ts):
 * closed results for the unblinded statistician and DMC members only; data entry for the
 * statistician only; open status and the open audit trail for everyone on the trial; account
 * management for the administrator, who stays blinded. "outsider" is a signed-in account on no
 * trial: a trial's pages and routes answer 404 to it (the trial's existence is not confirmed).
 *
 * Writes are requested too, with a body that is invalid on purpose: a role that may not write
 * gets 401/403/404 before the body is read; a role that may gets the validation answer (422,
 * or 415 for a wrong upload type), which shows the gate let it through while nothing changes.
 */
export const ROLES = ["admin", "statistician", "dmc", "sponsor", "coordinator", "outsider", "anonymous"] as const;
export type MatrixRole = (typeof ROLES)[number];

/** Roles that must never receive arm-level or outcome data. */
export const BLINDED_ROLES: readonly MatrixRole[] = ["admin", "sponsor", "coordinator", "outsider", "anonymous"];

/**
 * Expected answer. A number is the HTTP status. For server actions (which answer 200 with the
 * form state): "refused" = the action's state carries the sign-in/role/trial refusal;
 * "invalid" = the role passed the gate and the deliberately empty form was refused as invalid.
 * null = not requested for this role (it would change data; the functional specs cover it).
 */
export type Cell = number | "refused" | "invalid" | null;

export type MatrixRow = {
  kind: "page" | "api" | "action";
  method: "GET" | "POST" | "PUT" | "DELETE";
  /** URL with placeholders; for an action, the page it is posted to. */
  path: string;
  /** For kind "action": "app/<file>.ts#exportName", as the coverage test enumerates it. */
  action?: string;
  expect: Record<MatrixRole, Cell>;
  /** JSON body (api), or raw text with contentType. */
  body?: unknown;
  contentType?: string;
  /** Form fields of an action call (placeholders allowed). */
  form?: Record<string, string>;
  /** The page or route does not exist yet; the test is marked fixme until it does. */
  pending?: boolean;
};

type Expect = Record<MatrixRole, Cell>;
const on = (cells: Partial<Expect>, rest: Cell, anonymous: Cell, outsider: Cell): Expect => ({
  admin: rest,
  statistician: rest,
  dmc: rest,
  sponsor: rest,
  coordinator: rest,
  ...cells,
  outsider,
  anonymous,
});

// Trial-scoped reads: the outsider is told 404; anonymous 307 to sign-in for pages, 401 for the API.
const everyone = (anonymous: number, ok = 200): Expect => on({}, ok, anonymous, 404);
const unblindedOnly = (anonymous: number): Expect => on({ statistician: 200, dmc: 200 }, 403, anonymous, 404);
const statisticianOnly = (anonymous: number): Expect => on({ statistician: 200 }, 403, anonymous, 404);
// Trial-scoped writes with an invalid body: allowed roles get `ok` (422 unless said otherwise).
const writers = (allowed: MatrixRole[], ok: Cell = 422): Expect => on(Object.fromEntries(allowed.map((r) => [r, ok])), 403, 401, 404);
const EDIT_DESIGN: MatrixRole[] = ["admin", "statistician"];
const ENTER_DATA: MatrixRole[] = ["statistician"];
const MANAGE_MEETINGS: MatrixRole[] = ["statistician", "coordinator"];
// Server actions: anonymous is redirected by proxy.ts before the action runs.
const actionFor = (allowed: MatrixRole[], ok: Cell = "invalid"): Expect => on(Object.fromEntries(allowed.map((r) => [r, ok])), "refused", 307, "refused");

const page = (path: string, expect: Expect, extra: Partial<MatrixRow> = {}): MatrixRow => ({ kind: "page", method: "GET", path, expect, ...extra });
const get = (path: string, expect: Expect, extra: Partial<MatrixRow> = {}): MatrixRow => ({ kind: "api", method: "GET", path, expect, ...extra });
const write = (method: "POST" | "PUT" | "DELETE", path: string, expect: Expect, extra: Partial<MatrixRow> = {}): MatrixRow => ({ kind: "api", method, path, expect, body: {}, ...extra });
const action = (file: string, name: string, path: string, expect: Expect, form: Record<string, string> = {}): MatrixRow => ({ kind: "action", method: "POST", path, action: `${file}#${name}`, expect, form });

const A = "/api/trials/{trial}";
const LOOK = `${A}/analyses/{analysis}`;
const MEETINGS = "app/trials/[trialId]/meetings/actions.ts";
const COMMITTEE = "app/trials/[trialId]/committee/actions.ts";
const MEETING_COMMITTEE = "app/trials/[trialId]/meetings/[meetingId]/committee/actions.ts";
const CLOSED_SESSION = "app/trials/[trialId]/meetings/[meetingId]/closed-session/actions.ts";
/** A calibration id no job has: the allowed roles reach the lookup (404), the others are refused first. */
const NO_JOB = "2147480000";

export const AUTHORIZATION_MATRIX: MatrixRow[] = [
  // Pages
  page("/", on({}, 307, 307, 307)),
  page("/signin", on({}, 307, 200, 307)),
  page("/trials", on({}, 200, 307, 200)),
  page("/trials/new", on({ admin: 200, statistician: 200 }, 403, 307, 403)),
  page("/trials/{trial}", everyone(307)),
  page("/trials/{trial}/design", everyone(307)),
  page("/trials/{trial}/analyses", statisticianOnly(307)),
  page("/trials/{trial}/analyses/{analysis}", statisticianOnly(307)),
  page("/trials/{trial}/review", unblindedOnly(307)),
  page("/trials/{trial}/review/{analysis}", unblindedOnly(307)),
  page("/trials/{trial}/audit", everyone(307)),
  page("/trials/{trial}/meetings", everyone(307)),
  page("/trials/{trial}/meetings/{meeting}", everyone(307)),
  page("/trials/{trial}/committee", everyone(307)),
  page("/trials/{trial}/meetings/{meeting}/committee", everyone(307)),
  // Votes, comments, the tally and the closed minutes: DMC and unblinded statistician only.
  page("/trials/{trial}/meetings/{meeting}/closed-session", unblindedOnly(307)),
  page("/admin", on({ admin: 200 }, 403, 307, 403)),
  page("/admin/mail", on({ admin: 200 }, 403, 307, 403)),
  // A caught message that does not exist: the administrator reaches the lookup (404), others are refused.
  get("/admin/mail/eml/no-such-message", on({ admin: 404 }, 403, 307, 403)),
  page("/account", on({}, 200, 307, 200)),
  // Public: the one-time token in the link's fragment is the credential, checked when the form is sent.
  page("/set-password", on({}, 200, 200, 200)),

  // Public routes
  get("/api/health", on({}, 200, 200, 200)),
  get("/api/auth/session", on({}, 200, 200, 200)),
  // next-auth refuses a credentials post without its CSRF token (a redirect back to sign-in); nobody is signed in or out.
  write("POST", "/api/auth/callback/credentials", on({}, 302, 302, 302), { body: "email=x&password=y", contentType: "application/x-www-form-urlencoded" }),

  // Trial-scoped reads
  get(`${A}/open-status`, everyone(401)),
  get(`${A}/designs`, everyone(401)),
  get(`${A}/designs/{design}`, everyone(401)),
  get(`${A}/analyses`, everyone(401)),
  get(LOOK, everyone(401)),
  get(`${LOOK}/patients`, unblindedOnly(401)),
  get(`${LOOK}/review`, unblindedOnly(401)),
  get(`${LOOK}/review/export`, unblindedOnly(401)),
  get(`${LOOK}/review/r-script`, unblindedOnly(401)),
  get(`${LOOK}/interval?arm={arm}&lo=0.2&hi=0.4`, unblindedOnly(401)),
  get(`${LOOK}/what-if?patients=1&responders=0&patientsT=1&respondersT=0&patientsC=1&respondersC=0`, unblindedOnly(401)),
  get(`${LOOK}/recommendations`, unblindedOnly(401)),
  get(`${A}/audit`, everyone(401)),
  get(`${A}/calibrations/${NO_JOB}`, writers(EDIT_DESIGN, 404)),
  get(`${A}/meetings/{meeting}/packets/{packetOpen}`, everyone(401)),
  get(`${A}/meetings/{meeting}/packets/{packetClosed}`, unblindedOnly(401)),
  // The fixture's meeting has no letter yet: everyone on the trial reaches the lookup (404).
  get(`${A}/meetings/{meeting}/letter`, everyone(401, 404)),
  get(`${A}/meetings/{meeting}/closed-session`, unblindedOnly(401)),

  // Trial-scoped writes (invalid bodies: nothing changes for anyone)
  write("POST", `${A}/designs`, writers(EDIT_DESIGN)),
  write("PUT", `${A}/designs/{design}`, writers(EDIT_DESIGN)),
  write("POST", `${A}/designs/{design}/lock`, writers(["statistician"])),
  write("POST", `${A}/designs/{design}/amend`, writers(EDIT_DESIGN)),
  write("POST", `${A}/design-preview`, writers(["admin", "statistician", "dmc", "sponsor", "coordinator"])),
  write("POST", `${A}/calibrations`, writers(EDIT_DESIGN)),
  write("DELETE", `${A}/calibrations/${NO_JOB}`, writers(EDIT_DESIGN, 404)),
  write("PUT", `${LOOK}/counts`, writers(ENTER_DATA)),
  write("POST", `${LOOK}/lock`, writers(ENTER_DATA)),
  write("POST", `${LOOK}/open`, writers(ENTER_DATA)),
  write("POST", `${LOOK}/reopen`, writers(ENTER_DATA)),
  // The switch to count-level entry: the statistician reaches the service, which refuses it on a locked look (409, nothing changes).
  write("POST", `${LOOK}/count-level`, writers(ENTER_DATA, 409), { body: { rowVersion: 1, reason: "Matrix probe: must change nothing for any role." } }),
  // A JSON body is not a CSV upload: the statistician gets 415 and nothing is checked or stored;
  // the confirmation without its ?rowVersion= is refused (422) before the body is read.
  write("POST", `${LOOK}/upload/preview`, writers(ENTER_DATA, 415)),
  write("POST", `${LOOK}/upload/confirm`, writers(ENTER_DATA)),
  write("POST", `${LOOK}/recommendations`, writers(["dmc"])),

  // Server actions, posted with the Next-Action header (empty forms: invalid for the roles allowed)
  action("app/admin/actions.ts", "createAccount", "/admin", on({ admin: "invalid" }, "refused", 307, "refused")),
  action("app/admin/actions.ts", "assignRole", "/admin", on({ admin: "invalid" }, "refused", 307, "refused")),
  action("app/admin/actions.ts", "removeRole", "/admin", on({ admin: "invalid" }, "refused", 307, "refused")),
  action("app/admin/actions.ts", "sendPasswordLink", "/admin", on({ admin: "invalid" }, "refused", 307, "refused")),
  action("app/admin/actions.ts", "deactivateAccount", "/admin", on({ admin: "invalid" }, "refused", 307, "refused")),
  action("app/admin/actions.ts", "reactivateAccount", "/admin", on({ admin: "invalid" }, "refused", 307, "refused")),
  action("app/account/actions.ts", "changePassword", "/account", on({}, "invalid", 307, "invalid")),
  action("app/account/actions.ts", "createApiTokenAction", "/account", on({}, "invalid", 307, "invalid")),
  action("app/account/actions.ts", "revokeApiTokenAction", "/account", on({}, "invalid", 307, "invalid")),
  // Public: an empty form has no token, so it is refused as invalid for everyone and changes nothing.
  action("app/set-password/actions.ts", "setPassword", "/set-password", on({}, "invalid", "invalid", "invalid")),
  action("app/trials/new/actions.ts", "createTrialAction", "/trials/new", on({ admin: "invalid", statistician: "invalid" }, "refused", 307, "refused")),
  action("app/trials/[trialId]/review/[analysisId]/actions.ts", "recordRecommendationAction", "/trials/{trial}/review/{analysis}", actionFor(["dmc"]), { trialId: "{trial}", analysisId: "{analysis}" }),
  action(MEETINGS, "scheduleMeeting", "/trials/{trial}/meetings", actionFor(MANAGE_MEETINGS), { trialId: "{trial}" }),
  action(MEETINGS, "generateOpenPacketAction", "/trials/{trial}/meetings", actionFor(MANAGE_MEETINGS), { trialId: "{trial}" }),
  // The closed packet: viewClosed and manageMeetings together, i.e. the unblinded statistician only.
  action("app/trials/[trialId]/review/[analysisId]/packet-actions.ts", "prepareClosedPacketAction", "/trials/{trial}/review/{analysis}", actionFor(["statistician"]), { trialId: "{trial}", analysisId: "{analysis}" }),
  action(MEETINGS, "sendPacket", "/trials/{trial}/meetings", actionFor(MANAGE_MEETINGS), { trialId: "{trial}" }),
  // Takes no other field: for the allowed roles it would queue reminders, so they are not requested.
  action(MEETINGS, "sendDueReminders", "/trials/{trial}/meetings", actionFor(MANAGE_MEETINGS, null), { trialId: "{trial}" }),
  action(MEETINGS, "saveAttendance", "/trials/{trial}/meetings", actionFor(MANAGE_MEETINGS), { trialId: "{trial}" }),
  action(MEETINGS, "cancelMeeting", "/trials/{trial}/meetings", actionFor(MANAGE_MEETINGS), { trialId: "{trial}" }),
  action(MEETINGS, "retryFailedEmail", "/trials/{trial}/meetings", actionFor(MANAGE_MEETINGS), { trialId: "{trial}" }),
  // The committee: its make-up is the administrator's; the chair-only and voting-member checks come
  // after the form is read, so an empty form is invalid for every DMC member.
  action(COMMITTEE, "addCommitteeMemberAction", "/trials/{trial}/committee", actionFor(["admin"]), { trialId: "{trial}" }),
  action(COMMITTEE, "changeCommitteeChairAction", "/trials/{trial}/committee", actionFor(["admin"]), { trialId: "{trial}" }),
  action(COMMITTEE, "setCharterQuorumAction", "/trials/{trial}/committee", actionFor(EDIT_DESIGN), { trialId: "{trial}" }),
  action(MEETING_COMMITTEE, "recordOpenAttendanceAction", "/trials/{trial}/committee", actionFor(MANAGE_MEETINGS), { trialId: "{trial}" }),
  action(MEETING_COMMITTEE, "recordClosedAttendanceAction", "/trials/{trial}/committee", actionFor(["statistician", "dmc"]), { trialId: "{trial}" }),
  action(MEETING_COMMITTEE, "declareConflictsAction", "/trials/{trial}/committee", actionFor(["dmc"]), { trialId: "{trial}" }),
  action(MEETING_COMMITTEE, "saveOpenMinutesAction", "/trials/{trial}/committee", actionFor(["statistician", "dmc", "coordinator"]), { trialId: "{trial}" }),
  action(MEETING_COMMITTEE, "saveClosedMinutesAction", "/trials/{trial}/committee", actionFor(["statistician", "dmc"]), { trialId: "{trial}" }),
  action(MEETING_COMMITTEE, "approveMinutesAction", "/trials/{trial}/committee", actionFor(["dmc"]), { trialId: "{trial}" }),
  action(MEETING_COMMITTEE, "signLetterAction", "/trials/{trial}/committee", actionFor(["dmc"]), { trialId: "{trial}" }),
  action(MEETING_COMMITTEE, "sendLetterAction", "/trials/{trial}/committee", actionFor(["dmc"]), { trialId: "{trial}" }),
  action(CLOSED_SESSION, "castVoteAction", "/trials/{trial}/committee", actionFor(["dmc"]), { trialId: "{trial}" }),
  action(CLOSED_SESSION, "recordCommitteeRecommendationAction", "/trials/{trial}/committee", actionFor(["dmc"]), { trialId: "{trial}" }),
];

/** What a refused action's form state says (lib/http.ts, lib/auth, app/trials/new/actions.ts). */
export const ACTION_REFUSAL = /Sign in to continue|Your role on this trial does not allow|That trial was not found|Only an administrator/;

/**
 * Closed data that a blinded body must never contain: JSON keys of closed results (plain or
 * escaped inside an RSC payload), responder counts as the screens write them, and the closed
 * rationales' words, for the demo scenario (db/seeds/demo.ts) and the matrix fixture
 * (matrix-fixture-data.ts, whose numbers appear nowhere else).
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
  // CRN-201 looks 1 and 2, CRN-305 look 1 (experimental 9 of 20, control 5 of 20), the fixture (31 of 43), as screens write counts.
  ...["3 / 10", "6 / 20", "9 / 20", "5 / 20", "31 / 43", "3 of 10", "6 of 20", "9 of 20", "5 of 20", "31 of 43", "31/43"].map((s) => ({ name: `count "${s}"`, pattern: new RegExp(s.replace(/\//g, "\\/")) })),
  { name: "toxicity count sentence", pattern: /\b[0-9]+ toxicities in [0-9]+ patients\b/ },
  { name: "seeded rationale", pattern: /well above the futility threshold/ },
  { name: "fixture rationale", pattern: /marram-kestrel/ },
  // "HPD" as a word of the page, not three letters inside a random token (a CSP nonce, a build id, a font
  // class): a nonce once held "HPD" and read as a leak.
  { name: "posterior summary heading", pattern: /Posterior response rate|Predictive probability of success \d|(?<![A-Za-z0-9+/=_-])HPD(?![A-Za-z0-9+/=_-])/ },
];

export function findOutcomeData(body: string): string[] {
  return OUTCOME_MARKERS.filter((m) => m.pattern.test(body)).map((m) => m.name);
}
