/**
 * The one browser-side client of Cairn's JSON API (interim data, design studio, threshold search,
 * interval question). Every answer becomes an outcome the forms can show:
 * the server's own message, field errors keyed by path, or the CSV row-by-row problems.
 */
export type CsvIssueJson = { line: number | null; column: string | null; message: string };
type PathIssueJson = { path: string; message: string };
/** `pathIssues` keeps the zod issues in order, for forms that place them themselves. */
export type ApiFailure = { ok: false; status: number; error: string; fieldErrors: Record<string, string>; pathIssues: PathIssueJson[]; issues: CsvIssueJson[] };
type ApiOutcome<T> = { ok: true; data: T } | ApiFailure;

export async function callApi<T>(url: string, init: RequestInit): Promise<ApiOutcome<T>> {
  let res: Response;
  try {
    res = await fetch(url, { ...init, headers: { Accept: "application/json", ...(init.headers ?? {}) } });
  } catch (e) {
    // A call the caller abandoned (a newer keystroke) is not a failure to show: let it propagate.
    if (init.signal?.aborted || (e as Error)?.name === "AbortError") throw e;
    return { ok: false, status: 0, error: `The server could not be reached${(init.method ?? "GET").toUpperCase() === "GET" ? "" : "; nothing was saved"}. Check your connection and try again.`, fieldErrors: {}, pathIssues: [], issues: [] };
  }
  const body = (await res.json().catch(() => ({}))) as Record<string, unknown>;
  if (res.ok) return { ok: true, data: body as T };
  const details = (body.details ?? {}) as { issues?: unknown };
  const pathIssues = ((Array.isArray(body.issues) ? body.issues : Array.isArray(details.issues) ? details.issues : []) as Array<Record<string, unknown>>).filter(
    (i) => typeof i.path === "string",
  ) as Array<{ path: string; message: string }>;
  const csvIssues = (Array.isArray(details.issues) ? details.issues : []).filter((i: Record<string, unknown>) => "line" in i) as CsvIssueJson[];
  const fieldErrors: Record<string, string> = {};
  for (const i of pathIssues) if (!(i.path in fieldErrors)) fieldErrors[i.path] = i.message;
  if ((details as { field?: string }).field === "password") fieldErrors.password = String(body.error);
  return { ok: false, status: res.status, error: typeof body.error === "string" ? body.error : `The request failed (${res.status}).`, fieldErrors, pathIssues, issues: csvIssues };
}

export const jsonInit = (method: string, body: unknown): RequestInit => ({ method, headers: { "Content-Type": "application/json" }, body: JSON.stringify(body) });
