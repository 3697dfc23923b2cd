// Parser tests: the tree survives mistakes, several errors per file, exact ranges, no throws.
import { describe, expect, it } from "vitest";
import { parseSpw } from "./parse";

const VALID = `# comment
model "m" {
  spin 1/2
  convention antiferro-positive
  lattice chain sites Cu
  let J1 = 14.2 K
  let w = 3 cm^-1
  exchange heisenberg(J1) on Cu -> Cu + (1), shell 2
  exchange dm(0.1 * J1, (0, 0, 1)) on Cu -> Cu + (1)
  anisotropy Cu D = 0.5 K E = 0.1 K axis (0, 0, 1)
  g Cu = [[2, 0, 0], [0, 2, 0], [0, 0, 2.1]]
  field 3.5 T along (0, 0, 1) sweep 0 T to 10 T steps 20
  cluster 20 periodic
  probe 240 GHz
  expect u1 about (0, 0, 1)
}
`;

describe("parseSpw", () => {
  it("parses every statement kind of a valid file without diagnostics", () => {
    const r = parseSpw(VALID);
    expect(r.diagnostics).toEqual([]);
    const kinds = r.ast.models[0]?.statements.map((s) => s.kind);
    expect(kinds).toEqual(["spin", "convention", "latticePreset", "let", "let", "exchange", "exchange", "anisotropy", "g", "field", "cluster", "probe", "expect"]);
    expect(r.comments.length).toBe(1);
  });

  it("reads a convention's words and dashes as one name, without the line breaks between them", () => {
    const text = 'model "m" {\n  convention antiferro-positive\n\n-positive\n  lattice chain\n}\n';
    const s = parseSpw(text).ast.models[0]?.statements[0];
    expect(s?.kind).toBe("convention");
    if (s?.kind !== "convention") return;
    expect(s.value.name).toBe("antiferro-positive-positive");
    expect(text.slice(s.value.span.start, s.value.span.end)).toBe("antiferro-positive\n\n-positive");
  });

  it("reads a unit with a power after a number (3 cm^-1)", () => {
    const r = parseSpw(VALID);
    const let2 = r.ast.models[0]?.statements[4];
    expect(let2?.kind === "let" && let2.value.kind === "number" ? let2.value.unit : null).toMatchObject({ name: "cm", power: -1 });
  });

  it("respects precedence: 2 + 3 * 4 ^ 2 groups as 2 + (3 * (4 ^ 2))", () => {
    const r = parseSpw('model "m" { let x = 2 + 3 * 4 ^ 2 }');
    const s = r.ast.models[0]?.statements[0];
    expect(s?.kind).toBe("let");
    if (s?.kind !== "let" || s.value.kind !== "binary") throw new Error("not a binary expression");
    expect(s.value.op).toBe("+");
    expect(s.value.right.kind === "binary" && s.value.right.op).toBe("*");
  });

  it("reports three independent mistakes and keeps the statements between them", () => {
    const text = `model "m" {
  let = 5 K
  lattice chain
  let J = 2 K +
  convention antiferro-positive
  field 3 T along (0, 0, 1
  cluster 8 periodic
}`;
    const r = parseSpw(text);
    const syntax = r.diagnostics.filter((d) => d.code === "spw-syntax");
    expect(syntax.length).toBe(3);
    const lines = syntax.map((d) => text.slice(0, d.span.start).split("\n").length);
    expect(lines).toEqual([2, 4, 6]);
    const kinds = r.ast.models[0]?.statements.map((s) => s.kind);
    expect(kinds).toContain("latticePreset");
    expect(kinds).toContain("convention");
    expect(kinds).toContain("cluster");
  });

  it("never throws on hostile input and keeps ranges inside the text", () => {
    const inputs = ["", "}", "{{{{", "model", 'model "', "model \"x\" { let x = ((((((((( }", "\u0000\uffff", "model \"x\" { exchange ( on -> + }"];
    for (const t of inputs) {
      const r = parseSpw(t);
      for (const d of r.diagnostics) {
        expect(d.span.start).toBeGreaterThanOrEqual(0);
        expect(d.span.end).toBeLessThanOrEqual(t.length);
        expect(d.span.end).toBeGreaterThanOrEqual(d.span.start);
      }
    }
  });

  it("names the next statement keyword when a statement stops short, at the end of its line", () => {
    const text = 'model "m" {\n  let J1 =\n  let J2 = 1 K\n}\n';
    const errors = parseSpw(text).diagnostics.filter((d) => d.code === "spw-syntax");
    expect(errors.map((d) => d.message)).toEqual(["Expected a value here (a number with its unit, a parameter name, or an expression in parentheses), found 'let'."]);
    // Where the value is missing: on the '=' that ends line 2, not on the next line's 'let'.
    expect(text.slice(errors[0]?.span.start, errors[0]?.span.end)).toBe("=");
    const sameLine = 'model "m" { let a = let b = 1 }';
    const e = parseSpw(sameLine).diagnostics[0];
    expect(e?.span.start).toBe(sameLine.indexOf("let b"));
  });

  it("reads a header without quotes or with strays, keeps the block, and reports each once", () => {
    const unquoted = parseSpw('model chain {\n  lattice chain\n}\n');
    expect(unquoted.ast.models[0]?.name.name).toBe("chain");
    expect(unquoted.ast.models[0]?.statements.map((s) => s.kind)).toEqual(["latticePreset"]);
    expect(unquoted.diagnostics.map((d) => d.message)).toEqual(['The model name goes in quotes: model "chain" { ... }.']);
    const stray = parseSpw('model on "t" {\n  lattice chain\n}\n');
    expect(stray.ast.models[0]?.name.name).toBe("t");
    expect(stray.diagnostics.map((d) => d.message)).toEqual(["Unexpected 'on' in the model header, which reads model \"name\" {."]);
  });

  it("takes a '}' with more code after it on its line as a stray, not the end of the block", () => {
    const r = parseSpw('model "m" {\n  lattice chain\n  let J = 1 K }x\n  cluster 8 periodic\n}\n');
    expect(r.ast.models[0]?.statements.map((s) => s.kind)).toEqual(["latticePreset", "let", "junk", "junk", "cluster"]);
    expect(r.ast.models[0]?.closeSpan).toBeDefined();
    const oneLine = parseSpw('model "m" { lattice chain }');
    expect(oneLine.diagnostics).toEqual([]);
  });

  it("reports an unclosed block once at the end of the file, and a custom lattice left open at the next statement", () => {
    const text = 'model "m" {\n  lattice chain\n  spin 1/';
    const errors = parseSpw(text).diagnostics;
    expect(errors.length).toBe(1);
    const open = parseSpw('model "m" {\n  lattice {\n    vector a1 = (1, 0, 0)\n    site A = (0, 0, 0) spin 1\n  let J = 1 K\n}\n');
    expect(open.ast.models[0]?.statements.map((s) => s.kind)).toEqual(["latticeCustom", "let"]);
    expect(open.diagnostics.map((d) => d.message)).toEqual(["Expected '}' here, found 'let'. Close the lattice block with '}'."]);
  });

  it("keeps malformed entries of a custom lattice (and a name before its braces) inside the lattice, so its '}' does not end the model", () => {
    const text = 'model "m" {\n  lattice custom {\n    vectors (1, 0, 0), (0, 5, 0)\n    site A at (0, 0, 0)\n  }\n  let J = 1 K\n  cluster 8 periodic\n}\n';
    const r = parseSpw(text);
    const kinds = r.ast.models[0]?.statements.map((s) => s.kind).filter((k) => k !== "junk");
    expect(kinds).toEqual(["latticeCustom", "let", "cluster"]);
    expect(r.ast.models[0]?.closeSpan?.start).toBe(text.lastIndexOf("}"));
    const messages = r.diagnostics.map((d) => d.message);
    expect(messages.filter((m) => m.includes("outside the model block") || m.includes("inside the model block"))).toEqual([]);
    // One message a malformed line, saying what an entry looks like; the lattice's own '}' is no stray.
    const entries = r.diagnostics.filter((d) => d.message.includes("in the custom lattice"));
    expect(entries.map((d) => text.slice(d.span.start, d.span.end))).toEqual(["vectors (1, 0, 0), (0, 5, 0)", "site A at (0, 0, 0)"]);
    expect(entries[0]?.message).toContain("`vector a1 = (1, 0, 0)` or `site A = (0, 0, 0)`");
    // The parser's own "Expected '}'" at the first malformed entry would say less at the same place.
    expect(messages.filter((m) => m.startsWith("Expected '}'"))).toEqual([]);
  });
});

describe("a name left out", () => {
  it("is named by what it is where it is missing", () => {
    const message = (line: string) => parseSpw(`model "m" {\n  ${line}\n}\n`).diagnostics.find((d) => d.code === "spw-syntax")?.message;
    expect(message("exchange heisenberg(J) on Cu ->")).toBe("Expected a site name (a bond reads Cu -> Cu + (1), or shell 1) here, found '}'.");
    expect(message("let = 1 meV")).toBe("Expected a parameter name (let J1 = 1 meV) here, found '='.");
    expect(message("exchange heisenberg(J) on -> Cu + (1)")).toBe("Expected 'shell' or a site name here, found '->'.");
    // Alone: the tokens the recovery skipped from there are not reported again as strays.
    expect(parseSpw('model "m" {\n  exchange heisenberg(J) on -> Cu + (1)\n}\n').diagnostics).toHaveLength(1);
    expect(message("expect")).toBe("Expected a symmetry (su2, u1 about (x, y, z), or none) here, found '}'.");
  });
});

describe("a misspelt statement keyword", () => {
  it("is named with the keyword it resembles; a stray word like no keyword is not", () => {
    const message = (line: string) => parseSpw(`model "m" {\n  ${line}\n}\n`).diagnostics.find((d) => d.code === "spw-syntax")?.message;
    expect(message("feld 3 T")).toBe(
      "Unexpected 'feld 3 T': did you mean 'field'? A statement inside the model block starts with one of spin, convention, lattice, let, exchange, anisotropy, g, field, cluster, probe, expect.",
    );
    expect(message("exchnage heisenberg(J) on shell 1")).toContain(": did you mean 'exchange'? A statement");
    expect(message("foo 3")).toBe("Unexpected 'foo 3': a statement inside the model block starts with one of spin, convention, lattice, let, exchange, anisotropy, g, field, cluster, probe, expect.");
  });
});
