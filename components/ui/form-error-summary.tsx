import { Banner } from "./banner";
import { fieldName } from "@/lib/form-errors";

/**
 * A form's refusal at its top: the message, then each field that needs attention with its problem,
 * linked to the field (the same messages stand beside the fields). Nothing when there is no error.
 */
export function FormErrorSummary({ error, fieldErrors, labels = {}, title }: { error?: string | null; fieldErrors?: Record<string, string[] | string | undefined>; labels?: Record<string, string>; title?: string }) {
  const entries = Object.entries(fieldErrors ?? {})
    .map(([k, v]) => [k, Array.isArray(v) ? v[0] : v] as const)
    .filter((e): e is readonly [string, string] => !!e[1]);
  if (!error && entries.length === 0) return null;
  return (
    <Banner tone="danger" title={title}>
      {error ? <p>{error}</p> : null}
      {entries.length ? (
        <ul className="mt-1 list-disc pl-5" data-testid="form-error-summary">
          {entries.map(([k, msg]) => (
            <li key={k}>
              <a href={`#${k}`} className="text-berry-700 underline">{fieldName(k, labels)}</a>: {msg}
            </li>
          ))}
        </ul>
      ) : null}
    </Banner>
  );
}
