// Completion from the tokens before the cursor (the text is usually half-typed, so the syntax
// tree is not trusted): statement keywords at the start of a statement, presets after `lattice`,
// exchange kinds after `exchange`, sites after `on` and `->`, units after a number, defined
// names in expressions, clause words where a clause may follow. Service layer.
import type { IToken } from "chevrotain";
import type { DocumentAnalysis } from "../analysis/analyze";
import type { Span } from "../base/text";
import { PRESETS } from "../model/lattice";
import { EXCHANGE_KINDS } from "../model/model";
import { CONSTANTS, ENERGY_UNIT_NAMES, FIELD_UNIT_NAMES } from "../model/units";
import { firstModel, formatNumber, inCommentOrString, lastTokenIndexBefore, siteNames, wordAround } from "./common";
import { parameterValueText } from "./quantities";
import { CLAUSE_WORDS, CONVENTIONS, KIND_SIGNATURES, KIND_SNIPPETS, STATEMENT_WORDS, SYMMETRY_CLAIMS, unitDescription } from "./vocabulary";

export type CompletionKind = "keyword" | "parameter" | "site" | "preset" | "exchangeKind" | "unit" | "constant" | "value" | "snippet";

export interface CompletionItem {
  readonly label: string;
  readonly kind: CompletionKind;
  readonly detail?: string;
  readonly documentation?: string;
  /** Text to insert; a VS Code snippet when `isSnippet`. Defaults to the label. */
  readonly insertText?: string;
  readonly isSnippet?: boolean;
  /** The text the item replaces (the word being typed). */
  readonly replaceSpan: Span;
  readonly sortText?: string;
}

const STATEMENT_STARTS = new Set(STATEMENT_WORDS.map((w) => w.word));
/** Tokens after which the statement surely goes on (the next word is not a new statement). */
const CONTINUATION = new Set(["=", "+", "-", "*", "/", "^", ",", "(", "[", "->", "on", "along", "sweep", "to", "steps", "about", "axis", "shell", "sites"]);

type Context =
  | { kind: "none" }
  | { kind: "topLevel" }
  | { kind: "statement" }
  | { kind: "latticeBlock" }
  | { kind: "preset" }
  | { kind: "exchangeKind" }
  | { kind: "site"; withAll: boolean; withShell: boolean }
  | { kind: "unit"; units: readonly string[] }
  | { kind: "expression"; exclude: string | null }
  | { kind: "convention" }
  | { kind: "claim" }
  | { kind: "words"; words: readonly string[] };

export function doComplete(a: DocumentAnalysis, offset: number): CompletionItem[] {
  if (inCommentOrString(a, offset)) return [];
  const word = wordAround(a.text, offset);
  const replaceSpan: Span = { start: word.start, end: word.end };
  const context = completionContext(a, word.start);
  return itemsFor(a, context, replaceSpan);
}

/** The innermost open brace before `offset` and the keyword that opened it. */
function openBlocks(tokens: readonly IToken[], upto: number): string[] {
  const stack: string[] = [];
  for (let i = 0; i <= upto; i++) {
    const t = tokens[i] as IToken;
    if (t.image === "{") {
      const opener = tokens.slice(Math.max(0, i - 3), i).find((x) => x.image === "lattice" || x.image === "model");
      stack.push(opener?.image ?? "model");
    } else if (t.image === "}") stack.pop();
  }
  return stack;
}

/** The statement keyword that the tokens up to `index` belong to (scanning back to a start). */
function statementKeyword(tokens: readonly IToken[], index: number): { word: string; at: number } | null {
  for (let i = index; i >= 0; i--) {
    const t = tokens[i] as IToken;
    if (t.image === "{" || t.image === "}") return null;
    if (STATEMENT_STARTS.has(t.image) || t.image === "vector" || t.image === "site") {
      // `spin` also follows a site position inside a custom lattice (`site A = (0,0,0) spin 1`).
      return { word: t.image, at: i };
    }
  }
  return null;
}

function completionContext(a: DocumentAnalysis, wordStart: number): Context {
  const tokens = a.parsed.tokens;
  const i = lastTokenIndexBefore(tokens, wordStart);
  const prev = tokens[i];
  const blocks = openBlocks(tokens, i);
  const lineStart = a.text.lastIndexOf("\n", wordStart - 1) + 1;
  const atLineStart = a.text.slice(lineStart, wordStart).trim() === "";
  if (!prev) return { kind: "topLevel" };
  if (blocks.length === 0) return prev.image === "}" || atLineStart ? { kind: "topLevel" } : { kind: "none" };
  const inLattice = blocks[blocks.length - 1] === "lattice";
  if ((atLineStart && !CONTINUATION.has(prev.image)) || prev.image === "{" || prev.image === "}") return inLattice ? { kind: "latticeBlock" } : { kind: "statement" };

  const owner = statementKeyword(tokens, i);
  const stmt = owner?.word ?? "";
  const sameLine = !/[\r\n]/.test(a.text.slice((prev.endOffset ?? prev.startOffset) + 1, wordStart));
  const spaced = wordStart > (prev.endOffset ?? prev.startOffset) + 1;

  // A unit follows a number on the same line, after a space (`14.2 K`, `3 T`).
  if (prev.tokenType.name === "NumberLiteral" && sameLine && spaced) {
    const before = tokens[i - 1];
    if (before?.image === "^" || before?.image === "steps" || before?.image === "shell") return { kind: "none" };
    if (stmt === "let") return { kind: "unit", units: [...ENERGY_UNIT_NAMES, ...FIELD_UNIT_NAMES] };
    if (stmt === "cluster") return { kind: "words", words: ["periodic", "open"] };
    if (stmt === "spin" || stmt === "site" || stmt === "vector" || stmt === "g" || stmt === "expect") return { kind: "none" };
    if (stmt === "field") return { kind: "unit", units: FIELD_UNIT_NAMES };
    if (stmt === "exchange") {
      const onIndex = tokens.slice(owner!.at, i + 1).findIndex((t) => t.image === "on");
      if (onIndex >= 0) return { kind: "none" };
    }
    return { kind: "unit", units: ENERGY_UNIT_NAMES };
  }

  switch (prev.image) {
    case "lattice":
      return { kind: "preset" };
    case "exchange":
      return { kind: "exchangeKind" };
    case "on":
      return { kind: "site", withAll: false, withShell: true };
    case "->":
      return { kind: "site", withAll: false, withShell: false };
    case "anisotropy":
    case "g":
      return { kind: "site", withAll: true, withShell: false };
    case "convention":
      return { kind: "convention" };
    case "expect":
      return { kind: "claim" };
    case "sites":
      return { kind: "none" };
    default:
      break;
  }
  if (prev.image === "," && stmt === "exchange") {
    const afterOn = tokens.slice(owner!.at, i + 1).some((t) => t.image === "on");
    if (afterOn) return { kind: "site", withAll: false, withShell: true };
  }
  if (prev.image === "spin" && stmt === "spin") return { kind: "site", withAll: true, withShell: false };
  if (stmt === "let" && (prev.tokenType.name === "Identifier" || prev.image === "let") && tokens[i - 1]?.image === "let") return { kind: "none" };
  if (prev.image === "let") return { kind: "none" };

  const exclude = stmt === "let" ? (tokens[owner!.at + 1]?.image ?? null) : null;
  if (CONTINUATION.has(prev.image) || prev.image === "about" || prev.image === "along") return { kind: "expression", exclude };

  // After a complete value, the clause words a statement may go on with.
  const ended = prev.tokenType.name === "NumberLiteral" || prev.tokenType.name === "Identifier" || prev.image === ")" || prev.image === "]";
  if (ended) {
    const seen = new Set(tokens.slice(owner?.at ?? i, i + 1).map((t) => t.image));
    switch (stmt) {
      case "exchange":
        if (prev.image === ")" && !seen.has("on")) return { kind: "words", words: ["on"] };
        return { kind: "none" };
      case "field": {
        const words = seen.has("sweep") ? (seen.has("to") ? (seen.has("steps") ? [] : ["steps"]) : ["to"]) : seen.has("along") ? ["sweep"] : ["along", "sweep"];
        return { kind: "words", words };
      }
      case "cluster":
        return seen.has("periodic") || seen.has("open") ? { kind: "none" } : { kind: "words", words: ["periodic", "open"] };
      case "anisotropy":
        return { kind: "words", words: ["D", "E", "axis", "matrix"] };
      case "expect":
        return seen.has("u1") && !seen.has("about") ? { kind: "words", words: ["about"] } : { kind: "none" };
      case "lattice":
        return prev.tokenType.name === "Identifier" && tokens[i - 1]?.image === "lattice" ? { kind: "words", words: ["sites"] } : { kind: "none" };
      case "site":
        return seen.has("spin") ? { kind: "none" } : { kind: "words", words: ["spin"] };
      default:
        return { kind: "none" };
    }
  }
  return { kind: "none" };
}

function itemsFor(a: DocumentAnalysis, c: Context, replaceSpan: Span): CompletionItem[] {
  switch (c.kind) {
    case "none":
      return [];
    case "topLevel":
      return [
        {
          label: "model",
          kind: "snippet",
          detail: "model block",
          documentation: CLAUSE_WORDS["model"],
          insertText: 'model "${1:name}" {\n  spin ${2:1/2}\n  convention antiferro-positive\n  lattice ${3:chain}\n  $0\n}',
          isSnippet: true,
          replaceSpan,
        },
      ];
    case "statement":
      return STATEMENT_WORDS.map((w, k) => ({
        label: w.word,
        kind: "keyword" as const,
        detail: "statement",
        documentation: w.summary,
        insertText: w.snippet,
        isSnippet: true,
        replaceSpan,
        sortText: String(k).padStart(2, "0"),
      }));
    case "latticeBlock":
      return ["vector", "site"].map((w) => ({
        label: w,
        kind: "keyword" as const,
        documentation: CLAUSE_WORDS[w],
        insertText: w === "vector" ? "vector ${1:a1} = (${2:1, 0, 0})" : "site ${1:A} = (${2:0, 0, 0})",
        isSnippet: true,
        replaceSpan,
      }));
    case "preset":
      return Object.values(PRESETS).map((p) => ({
        label: p.name,
        kind: "preset" as const,
        detail: `${p.vectors.length}D, sites ${p.sites.map((s) => s.name).join(", ")}`,
        documentation: p.description,
        replaceSpan,
      }));
    case "exchangeKind":
      return EXCHANGE_KINDS.map((k) => ({
        label: k,
        kind: "exchangeKind" as const,
        detail: (KIND_SIGNATURES[k] ?? []).map((s) => s.label).join(" | "),
        documentation: KIND_SIGNATURES[k]?.[0]?.documentation ?? "",
        insertText: KIND_SNIPPETS[k] ?? k,
        isSnippet: true,
        replaceSpan,
      }));
    case "site": {
      const items: CompletionItem[] = siteNames(a).map((n) => ({ label: n, kind: "site", detail: "site", replaceSpan }));
      if (c.withAll) items.push({ label: "all", kind: "keyword", documentation: CLAUSE_WORDS["all"], replaceSpan });
      if (c.withShell) items.push({ label: "shell", kind: "keyword", documentation: CLAUSE_WORDS["shell"], insertText: "shell ${1:1}", isSnippet: true, replaceSpan });
      return items;
    }
    case "unit":
      return c.units.map((u, k) => ({
        label: u,
        kind: "unit" as const,
        detail: unitDescription(u) ?? "",
        replaceSpan,
        sortText: String(k).padStart(2, "0"),
      }));
    case "expression": {
      const items: CompletionItem[] = [];
      const model = a.model;
      for (const s of firstModel(a)?.statements ?? []) {
        if (s.kind !== "let" || s.name.name === c.exclude) continue;
        const p = model?.parameters.get(s.name.name);
        const value = p ? parameterValueText(a, p) : null;
        items.push({ label: s.name.name, kind: "parameter", detail: value ? `= ${value}` : "parameter", replaceSpan });
      }
      for (const [name, k] of Object.entries(CONSTANTS))
        items.push({ label: name, kind: "constant", detail: `${formatNumber(k.value, 8)}: ${k.label}`, replaceSpan });
      return items;
    }
    case "convention":
      return Object.entries(CONVENTIONS).map(([label, doc]) => ({ label, kind: "value" as const, documentation: doc, replaceSpan }));
    case "claim":
      return Object.entries(SYMMETRY_CLAIMS).map(([label, doc]) => ({
        label,
        kind: "value" as const,
        documentation: doc,
        ...(label === "u1" ? { insertText: "u1 about (${1:0, 0, 1})", isSnippet: true } : {}),
        replaceSpan,
      }));
    case "words":
      return c.words.map((w) => ({
        label: w,
        kind: "keyword" as const,
        documentation: CLAUSE_WORDS[w] ?? (w === "D" || w === "E" ? `Single-ion ${w} term, an energy.` : w === "matrix" ? "A 3x3 single-ion matrix of energies." : ""),
        ...(w === "D" || w === "E" || w === "matrix" ? { insertText: `${w} = `, isSnippet: false } : {}),
        replaceSpan,
      }));
  }
}
