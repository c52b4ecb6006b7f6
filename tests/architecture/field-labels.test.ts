// A <Field> (components/ui/field.tsx) labels its control with <label htmlFor={id ?? name}>. When the
// control inside has an id of its own and the Field is not told it, the label points at nothing: axe
// calls it "Form elements must have labels" (WCAG 1.3.1, 4.1.2), but only on the pages and states
// where that form shows (a reopen form appears once a look has been reviewed). This reads every
// component and page with TypeScript's parser and names each Field whose label misses its control.
import { readdirSync, readFileSync, statSync } from "node:fs";
import path from "node:path";
import ts from "typescript";
import { describe, expect, it } from "vitest";

const ROOT = path.resolve(import.meta.dirname, "../..");

function tsxFiles(dir: string): string[] {
  const out: string[] = [];
  for (const name of readdirSync(dir)) {
    const full = path.join(dir, name);
    if (statSync(full).isDirectory()) out.push(...tsxFiles(full));
    else if (name.endsWith(".tsx")) out.push(full);
  }
  return out;
}

function stringAttribute(attrs: ts.JsxAttributes, name: string): string | null | undefined {
  for (const a of attrs.properties) {
    if (!ts.isJsxAttribute(a) || a.name.getText() !== name) continue;
    if (a.initializer && ts.isStringLiteral(a.initializer)) return a.initializer.text;
    return null; // present but computed: not checked
  }
  return undefined;
}

/** The first element, `node` itself or inside it, with a literal id: the Field's control. */
function firstControlId(node: ts.Node): string | undefined {
  const attrs = ts.isJsxSelfClosingElement(node) ? node.attributes : ts.isJsxElement(node) ? node.openingElement.attributes : null;
  const id = attrs ? stringAttribute(attrs, "id") : undefined;
  if (typeof id === "string") return id;
  let found: string | undefined;
  ts.forEachChild(node, (child) => {
    found ??= firstControlId(child);
  });
  return found;
}

/** "file:line label points at X, control is Y" for every Field whose label misses its control. */
export function unlabelledFields(fileName: string, text: string): string[] {
  const source = ts.createSourceFile(fileName, text, ts.ScriptTarget.Latest, true, ts.ScriptKind.TSX);
  const problems: string[] = [];
  const visit = (n: ts.Node) => {
    if (ts.isJsxElement(n) && n.openingElement.tagName.getText() === "Field") {
      const attrs = n.openingElement.attributes;
      const name = stringAttribute(attrs, "name");
      const id = stringAttribute(attrs, "id");
      const target = id === undefined ? name : id;
      const control = n.children.map(firstControlId).find((c) => c !== undefined);
      if (typeof target === "string" && typeof control === "string" && target !== control) {
        problems.push(`${fileName}:${source.getLineAndCharacterOfPosition(n.getStart()).line + 1} label points at "${target}", the control is "${control}"`);
      }
    }
    ts.forEachChild(n, visit);
  };
  visit(source);
  return problems;
}

describe("every Field's label points at its control", () => {
  it("finds a Field whose control has another id (the check can fail)", () => {
    const snippet = `const f = <Field label="Reason" name="reason"><TextArea id="reopen-reason" name="reason" /></Field>;`;
    expect(unlabelledFields("snippet.tsx", snippet)).toEqual(['snippet.tsx:1 label points at "reason", the control is "reopen-reason"']);
    expect(unlabelledFields("fixed.tsx", snippet.replace('name="reason">', 'name="reason" id="reopen-reason">'))).toEqual([]);
  });

  it("no component or page has one", () => {
    const files = [...tsxFiles(path.join(ROOT, "components")), ...tsxFiles(path.join(ROOT, "app"))];
    expect(files.length).toBeGreaterThan(20);
    const problems = files.flatMap((f) => unlabelledFields(path.relative(ROOT, f), readFileSync(f, "utf8")));
    expect(problems).toEqual([]);
  });
});
