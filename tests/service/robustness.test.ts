// Robustness: every editor feature runs without throwing on damaged texts (deterministic
// pseudo-random cuts, insertions and duplications of the fixtures, plus hand-picked oddities).
// The server relies on this as a second line of defence behind its handler guards.
import { describe, expect, it } from "vitest";
import { analyzeDocument } from "../../server/src/analysis/analyze";
import * as S from "../../server/src/service/index";
import { CHAIN, LADDER } from "./fixtures";

/** A linear congruential generator (Numerical Recipes constants) for reproducible damage. */
function lcg(variant: number): () => number {
  let x = variant >>> 0;
  return () => {
    x = (Math.imul(x, 1664525) + 1013904223) >>> 0;
    return x / 2 ** 32;
  };
}

const PIECES = ["(", ")", "[", "]", "{", "}", ",", "=", "->", "+", "-", "*", "/", "^", "#", '"', "$", "1e999", "0", "K", "T", "cm^-", "let", "on", "exchange", "lattice", "shell", "\n", " ", "é", "\u{1F600}", "\r"];

function damaged(base: string, variant: number): string {
  const r = lcg(variant);
  let text = base;
  const steps = 1 + Math.floor(r() * 4);
  for (let k = 0; k < steps; k++) {
    const at = Math.floor(r() * (text.length + 1));
    const choice = r();
    if (choice < 0.35) text = text.slice(0, at) + text.slice(Math.min(text.length, at + 1 + Math.floor(r() * 12)));
    else if (choice < 0.8) text = text.slice(0, at) + PIECES[Math.floor(r() * PIECES.length)] + text.slice(at);
    else {
      const end = Math.min(text.length, at + Math.floor(r() * 40));
      text = text.slice(0, end) + text.slice(at, end) + text.slice(end);
    }
  }
  return text;
}

const ODD = ["", "\n", "}", "model", 'model "x" {', 'model "x" { lattice chain sites }', "let = 5", 'model "a" {}\nmodel "b" {}', "\u{1F600}".repeat(20), "#".repeat(1000), "(".repeat(300)];

function exercise(text: string): void {
  const a = analyzeDocument(text);
  const all = { start: 0, end: text.length };
  S.documentSymbols(a);
  S.foldingRanges(a);
  S.semanticTokens(a);
  S.formatDocument(a);
  S.codeActions(a, all);
  S.inlayHints(a, all, S.DEFAULT_SETTINGS);
  S.codeLenses(a, "file:///x.spw", S.DEFAULT_SETTINGS);
  S.summaryMarkdown(S.analysisSummary(a, S.DEFAULT_SETTINGS), "x.spw");
  const step = Math.max(1, Math.floor(text.length / 12));
  for (let offset = 0; offset <= text.length; offset += step) {
    S.doHover(a, offset);
    S.doComplete(a, offset);
    S.findDefinition(a, offset);
    S.findReferences(a, offset, true);
    S.documentHighlights(a, offset);
    S.prepareRename(a, offset);
    S.rename(a, offset, "Xnew");
    S.selectionSpans(a, offset);
    S.signatureHelp(a, offset);
  }
}

describe("robustness of the editor features", () => {
  it("survives odd inputs", () => {
    for (const text of ODD) expect(() => exercise(text)).not.toThrow();
  });

  it("survives 120 damaged versions of the fixtures", () => {
    for (let variant = 1; variant <= 120; variant++) {
      const text = damaged(variant % 2 ? CHAIN : LADDER, variant);
      expect(() => exercise(text), `variant ${variant}`).not.toThrow();
    }
  });

  it("formats damaged files only when that keeps every token", () => {
    for (let variant = 200; variant < 260; variant++) {
      const text = damaged(CHAIN, variant);
      const a = analyzeDocument(text);
      const edits = S.formatDocument(a);
      if (edits.length === 0) continue;
      let out = text;
      for (const e of [...edits].sort((x, y) => y.span.start - x.span.start)) out = out.slice(0, e.span.start) + e.newText + out.slice(e.span.end);
      const strip = (s: string) => s.replace(/\s+/g, "");
      expect(strip(out), `variant ${variant}`).toBe(strip(text));
    }
  });
});
