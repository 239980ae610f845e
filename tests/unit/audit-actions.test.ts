/**
 * Every audit action code the code base writes has words (lib/audit/actions.ts). The codes are
 * collected from the source itself: each `recordAudit(…)` call is found with the TypeScript compiler
 * and the type checker says which string literals its `action` can be (a literal, a ternary of
 * literals, a template over a literal union). An `action` whose value the checker cannot pin to
 * literals fails the test, so a code cannot slip past as a plain string. No published source: the
 * rule is the product's (people read words; storage and exports keep codes).
 */
import { execFileSync } from "node:child_process";
import path from "node:path";
import ts from "typescript";
import { describe, expect, it } from "vitest";
import { AUDIT_ACTION_WORDS, auditActionWords } from "@/lib/audit/actions";

const root = path.resolve(__dirname, "../..");

type Site = { at: string; codes: string[] | null };

/** Every recordAudit call outside tests, with the literal codes its action can take (null: not literals). */
function auditCallSites(): Site[] {
  const listed = execFileSync("git", ["grep", "-l", "recordAudit(", "--", "app", "components", "db", "lib", "scripts"], { cwd: root, encoding: "utf8" });
  const files = listed.split("\n").filter((f) => /\.tsx?$/.test(f)).map((f) => path.join(root, f));
  const config = ts.getParsedCommandLineOfConfigFile(path.join(root, "tsconfig.json"), {}, { ...ts.sys, onUnRecoverableConfigFileDiagnostic: () => {} });
  const program = ts.createProgram(files, { ...config!.options, noEmit: true });
  const checker = program.getTypeChecker();
  const sites: Site[] = [];
  for (const file of files) {
    const source = program.getSourceFile(file)!;
    const visit = (node: ts.Node) => {
      if (ts.isCallExpression(node) && ts.isIdentifier(node.expression) && node.expression.text === "recordAudit") {
        const { line } = source.getLineAndCharacterOfPosition(node.getStart(source));
        const at = `${path.relative(root, file)}:${line + 1}`;
        const entry = node.arguments[1];
        const action = entry && ts.isObjectLiteralExpression(entry) ? entry.properties.find((p) => p.name && ts.isIdentifier(p.name) && p.name.text === "action") : undefined;
        const type = action && ts.isPropertyAssignment(action) ? checker.getTypeAtLocation(action.initializer) : action ? checker.getTypeAtLocation(action) : undefined;
        const parts = type ? (type.isUnion() ? type.types : [type]) : [];
        sites.push({ at, codes: parts.length > 0 && parts.every((t) => t.isStringLiteral()) ? parts.map((t) => (t as ts.StringLiteralType).value) : null });
      }
      ts.forEachChild(node, visit);
    };
    visit(source);
  }
  return sites;
}

describe("audit action words", () => {
  const sites = auditCallSites();

  it("finds the call sites (the search itself works)", () => {
    // db/queries/shortlists.ts alone writes five codes; review.ts a ternary inside a template.
    expect(sites.length).toBeGreaterThan(30);
    const all = new Set(sites.flatMap((s) => s.codes ?? []));
    for (const code of ["shortlist.create", "measurement.reject", "rack-template.delete", "ph-fit.steps"]) expect(all.has(code), code).toBe(true);
  });

  it("can name every code each call site writes", () => {
    const unresolved = sites.filter((s) => s.codes === null).map((s) => s.at);
    expect(unresolved, "write the action as a literal code (or a union of them) at").toEqual([]);
  });

  it("has words for every code the code base writes", () => {
    const missing = sites.flatMap((s) => (s.codes ?? []).filter((c) => !Object.hasOwn(AUDIT_ACTION_WORDS, c)).map((c) => `${c} (${s.at})`));
    expect(missing, "add these codes to AUDIT_ACTION_WORDS in lib/audit/actions.ts").toEqual([]);
  });

  it("keeps no words for codes nothing writes", () => {
    const written = new Set(sites.flatMap((s) => s.codes ?? []));
    expect(Object.keys(AUDIT_ACTION_WORDS).filter((c) => !written.has(c))).toEqual([]);
  });

  it("gives words, not codes, and shows an unknown code as itself", () => {
    for (const [code, words] of Object.entries(AUDIT_ACTION_WORDS)) {
      expect(words, code).not.toMatch(/[._]|^[a-z]+-[a-z]+$/);
      expect(words, code).toMatch(/^[a-z]/);
    }
    expect(auditActionWords("lighting-profile.approve")).toBe("approved a lighting profile");
    expect(auditActionWords("something.new")).toBe("something.new");
  });
});
