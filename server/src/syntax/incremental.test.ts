// Parsing a new version with the previous parse (parseSpw(text, previous)) must give exactly what a
// fresh parse gives: the tree, the diagnostics, the tokens and comments, and tokenAt at any
// offset. Checked over long chains of random edits (typing, deletions, cut ranges, stray braces)
// of every project file; and a one-character edit must reuse every other statement as is.
import type { IToken } from "chevrotain";
import { describe, expect, it } from "vitest";
import { applyEdit, mulberry32, projectTexts, randomEdit } from "./mutations.testutil";
import { parseSpw, type ParsedFile } from "./parse";
import { statementExprs, walkExpr, type Statement } from "./ast";

const KEYWORD_OF: Partial<Record<Statement["kind"], string>> = {
  spin: "spin",
  convention: "convention",
  latticePreset: "lattice",
  latticeCustom: "lattice",
  let: "let",
  exchange: "exchange",
  anisotropy: "anisotropy",
  g: "g",
  field: "field",
  cluster: "cluster",
  probe: "probe",
  expect: "expect",
};

/**
 * Positions checked against the text itself, independently of how they were computed: a statement
 * starts with its keyword, a name or number spans exactly its text, stray text is what it says,
 * and every diagnostic lies inside the file.
 */
function expectPositionsMatchText(p: ParsedFile, text: string): void {
  for (const m of p.ast.models) {
    expect(text.slice(m.keywordSpan.start, m.keywordSpan.end)).toBe("model");
    for (const s of m.statements) {
      const keyword = KEYWORD_OF[s.kind];
      if (keyword) expect(text.slice(s.span.start, s.span.start + keyword.length)).toBe(keyword);
      if (s.kind === "junk") expect(text.slice(s.span.start, s.span.end)).toBe(s.text);
      if (s.kind === "let") expect(text.slice(s.name.span.start, s.name.span.end)).toBe(s.name.name);
      for (const e of statementExprs(s))
        walkExpr(e, (x) => {
          if (x.kind === "name") expect(text.slice(x.span.start, x.span.end)).toBe(x.name);
          if (x.kind === "number") expect(text.slice(x.span.start, x.span.start + x.text.length)).toBe(x.text);
        });
    }
  }
  for (const d of p.diagnostics) {
    expect(d.span.start).toBeGreaterThanOrEqual(0);
    expect(d.span.end).toBeLessThanOrEqual(text.length);
    expect(d.span.end).toBeGreaterThanOrEqual(d.span.start);
  }
}

function tokenView(ts: readonly IToken[]): unknown[] {
  return ts.map((t) => [t.tokenType.name, t.image, t.startOffset, t.endOffset, t.startLine, t.endLine]);
}

/** The token at an offset by a plain search over the whole token list (the reference). */
function tokenAtByScan(tokens: readonly IToken[], offset: number): IToken | undefined {
  let found: IToken | undefined;
  let index = -1;
  tokens.forEach((t, i) => {
    if (t.startOffset <= offset) {
      found = t;
      index = i;
    }
  });
  if (!found) return undefined;
  const end = (found.endOffset ?? found.startOffset) + 1;
  if (offset < end) return found;
  if (offset > end) return undefined;
  const next = tokens[index + 1];
  if (next && next.startOffset === offset && /^[A-Za-z_0-9]/.test(next.image) && !/^[A-Za-z_0-9]/.test(found.image)) return next;
  return found;
}

function expectSameParse(incremental: ParsedFile, fresh: ParsedFile, text: string, r: () => number): void {
  expectPositionsMatchText(incremental, text);
  expect(incremental.ast).toEqual(fresh.ast);
  expect(incremental.diagnostics).toEqual(fresh.diagnostics);
  expect(tokenView(incremental.tokens)).toEqual(tokenView(fresh.tokens));
  expect(tokenView(incremental.comments)).toEqual(tokenView(fresh.comments));
  for (let k = 0; k < 5; k++) {
    const offset = Math.floor(r() * (text.length + 1));
    const expected = tokenAtByScan(fresh.tokens, offset);
    expect(incremental.tokenAt(offset)?.startOffset, `tokenAt(${offset})`).toBe(expected?.startOffset);
    expect(fresh.tokenAt(offset)?.startOffset, `tokenAt(${offset})`).toBe(expected?.startOffset);
  }
}

describe("incremental parsing", () => {
  it("gives the fresh parse after each of 3000 random edits (chains of 12 edits of project files)", () => {
    const texts = projectTexts();
    const r = mulberry32(2026);
    for (let chain = 0; chain < 250; chain++) {
      let text = texts[chain % texts.length] as string;
      let parsed = parseSpw(text);
      for (let step = 0; step < 12; step++) {
        text = applyEdit(text, randomEdit(text, r));
        const incremental = parseSpw(text, parsed);
        expectSameParse(incremental, parseSpw(text), text, r);
        parsed = incremental;
      }
    }
  });

  it("types a model character by character and gives the fresh parse at every keystroke", () => {
    const target = texts()[0] as string;
    const r = mulberry32(5);
    let parsed = parseSpw("");
    for (let n = 1; n <= target.length; n++) {
      const text = target.slice(0, n);
      const incremental = parseSpw(text, parsed);
      expectSameParse(incremental, parseSpw(text), text, r);
      parsed = incremental;
    }
  });

  it("reads again from the line of the edit: a quote typed late in a line closes one opened earlier", () => {
    const cases: [string, string][] = [
      ['model "t" {\n  convention antiferro-positive\n  "lattice chain\n}\n', 'model "t" {\n  convention antiferro-positive\n  "lattice c"hain\n}\n'],
      ['model "t {ech let J = 1 K\n}\n', 'model "t {ech" let J = 1 K\n}\n'],
      ['model "a" {\n lattice chain\n}\nmodel "b" {\n let x = 1\n}\n', 'model "a" {\n lattice chain\n}\nmo "b" {\n let x = 1\n}\n'],
      ['model "a" {\n let x = 1\n exchange heisenberg(x) on shell 1\n}\n', 'model "a" {\n let x = 1\n exchange }heisenberg(x) on shell 1\n}\n'],
      ['model "a" {\n lattice {\n  site A = (0, 0, 0) spin 1\n }\n let x = 1\n}\n', 'model "a" {\n lattice {\n  site A = (0, 0, 0) spin 1\n \n let x = 1\n}\n'],
    ];
    const r = mulberry32(3);
    for (const [before, after] of cases) {
      expectSameParse(parseSpw(after, parseSpw(before)), parseSpw(after), after, r);
      expectSameParse(parseSpw(before, parseSpw(after)), parseSpw(before), before, r);
    }
  });

  it("reuses every statement a one-character edit does not touch (the same objects)", () => {
    const text = ['model "m" {', "  lattice chain", "  let J1 = 10 K", "  let J2 = 0.2 * J1", "  exchange heisenberg(J1) on shell 1", "}", ""].join("\n");
    const before = parseSpw(text);
    const [s0, s1, s2, s3] = before.ast.models[0]?.statements ?? [];
    const exchangeStart = s3?.span.start ?? 0;
    const at = text.indexOf("0.2") + 3;
    const after = parseSpw(text.slice(0, at) + "5" + text.slice(at), before);
    const [t0, t1, t2, t3] = after.ast.models[0]?.statements ?? [];
    expect(t0).toBe(s0);
    expect(t1).toBe(s1);
    expect(t2).not.toBe(s2);
    expect(t2?.kind === "let" && t2.value.kind === "binary" && t2.value.left.kind === "number" ? t2.value.left.value : null).toBe(0.25);
    // After the edit: the same tree, not parsed again, moved one character on.
    expect(t3).toBe(s3);
    expect(t3?.span.start).toBe(exchangeStart + 1);
    // The previous parse has been consumed: it is not reused a second time.
    const again = parseSpw(text, before);
    expect(again.ast.models[0]?.statements[0]).not.toBe(s0);
    expect(again.ast).toEqual(parseSpw(text).ast);
  });
});

function texts(): string[] {
  return projectTexts().filter((t) => t.includes("model") && t.length > 300);
}
