// The hand-written scanner against a reference: chevrotain's own Lexer built from the same token
// definitions (lexer.ts). Tokens, comments, offsets, lines and error runs must agree on every
// project file, on thousands of randomly edited files and on random character soup.
import { describe, expect, it } from "vitest";
import { ALL_TOKENS } from "./lexer";
import { Lexer } from "chevrotain";
import { applyEdit, mulberry32, projectTexts, randomEdit } from "./mutations.testutil";
import { scanText } from "./scanner";

const reference = new Lexer(ALL_TOKENS, { positionTracking: "full", ensureOptimizations: false, recoveryEnabled: true });

interface TokenLike {
  readonly tokenType: { readonly name: string };
  readonly image: string;
  readonly startOffset: number;
  readonly endOffset?: number;
  readonly startLine?: number;
  readonly endLine?: number;
}

const view = (t: TokenLike): unknown[] => [t.tokenType.name, t.image, t.startOffset, t.endOffset, t.startLine, t.endLine];

function viaReference(text: string): unknown {
  const r = reference.tokenize(text);
  return { tokens: r.tokens.map(view), comments: (r.groups["comments"] ?? []).map(view), errors: r.errors.map((e) => [e.offset, e.length, e.line]) };
}

function viaScanner(text: string): unknown {
  const r = scanText(text);
  return { tokens: r.tokens.map(view), comments: r.comments.map(view), errors: r.errors.map((e) => [e.offset, e.length, e.line]) };
}

describe("scanner", () => {
  it("agrees with chevrotain's Lexer on every project file", () => {
    const texts = projectTexts();
    expect(texts.length).toBeGreaterThan(40);
    for (const t of texts) expect(viaScanner(t)).toEqual(viaReference(t));
  });

  it("agrees with chevrotain's Lexer on 2000 randomly edited project files", () => {
    const texts = projectTexts();
    const r = mulberry32(7);
    for (let i = 0; i < 2000; i++) {
      let t = texts[Math.floor(r() * texts.length)] as string;
      for (let k = 0; k < 3; k++) t = applyEdit(t, randomEdit(t, r));
      expect(viaScanner(t), JSON.stringify(t)).toEqual(viaReference(t));
    }
  });

  it("agrees with chevrotain's Lexer on random character soup (numbers, strings, line ends, strays)", () => {
    const alphabet = ["a", "Z", "_", "e", "E", "0", "7", ".", "+", "-", ">", "#", '"', "$", "@", "é", " ", "\t", "\n", "\r", "\u00a0", "{", "}", "^", "model", "let", "spin"];
    const r = mulberry32(11);
    for (let i = 0; i < 3000; i++) {
      const n = Math.floor(r() * 30);
      let t = "";
      for (let k = 0; k < n; k++) t += alphabet[Math.floor(r() * alphabet.length)];
      expect(viaScanner(t), JSON.stringify(t)).toEqual(viaReference(t));
    }
  });

  it("scans a piece with offsets and lines relative to its start", () => {
    const text = "let a = 1\nlet b = 2 K # two\n";
    const from = text.indexOf("let b");
    const r = scanText(text, from);
    expect(r.tokens.map((t) => [t.image, t.startOffset, t.startLine])).toEqual([
      ["let", 0, 1],
      ["b", 4, 1],
      ["=", 6, 1],
      ["2", 8, 1],
      ["K", 10, 1],
    ]);
    expect(r.comments.map((c) => [c.image, c.startOffset])).toEqual([["# two", 12]]);
  });
});
