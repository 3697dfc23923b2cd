// Canonical formatting: one statement per line, two-space indentation per block, single spaces
// around `=`, `->` and binary operators, none inside brackets, `1/2` and `cm^-1` tight, comments
// kept, at most one blank line; line breaks inside a statement stay (a name after a number on the
// same line is its unit). The result must re-lex to the same tokens, or nothing changes. Service layer.
import type { IToken } from "chevrotain";
import type { DocumentAnalysis } from "../analysis/analyze";
import type { Span } from "../base/text";
import { scanText } from "../syntax/scanner";
import type { TextEdit } from "./common";

interface Item {
  readonly image: string;
  readonly start: number;
  readonly end: number;
  readonly type: string;
  readonly isComment: boolean;
}

const INDENT = "  ";
const BINARY_OR_OPEN = new Set(["=", "+", "-", "*", "/", "^", ",", "(", "[", "{", "->"]);

/** Formats the whole text; null when the file has syntax errors or nothing would change. */
export function formatDocument(a: DocumentAnalysis): TextEdit[] {
  const formatted = formatText(a);
  if (formatted === null || formatted === a.text) return [];
  // One edit covering only the part that changed keeps the editor's cursor and scroll stable.
  let prefix = 0;
  const max = Math.min(formatted.length, a.text.length);
  while (prefix < max && formatted[prefix] === a.text[prefix]) prefix++;
  let suffix = 0;
  while (suffix < max - prefix && formatted[formatted.length - 1 - suffix] === a.text[a.text.length - 1 - suffix]) suffix++;
  return [{ span: { start: prefix, end: a.text.length - suffix }, newText: formatted.slice(prefix, formatted.length - suffix) }];
}

function isUnarySign(items: readonly Item[], k: number): boolean {
  const t = items[k];
  if (!t || (t.image !== "-" && t.image !== "+")) return false;
  let j = k - 1;
  while (j >= 0 && items[j]?.isComment) j--;
  const p = items[j];
  if (!p) return true;
  return BINARY_OR_OPEN.has(p.image) || p.type.startsWith("Kw_");
}

function statementStarts(a: DocumentAnalysis): { starts: Set<number>; tight: Span[] } {
  const starts = new Set<number>();
  const tight: Span[] = [];
  for (const m of a.parsed.ast.models) {
    starts.add(m.keywordSpan.start);
    for (const s of m.statements) {
      starts.add(s.span.start);
      if (s.kind === "convention") tight.push(s.value.span);
      if (s.kind === "latticeCustom") {
        for (const v of s.vectors) starts.add(v.span.start);
        for (const x of s.sites) starts.add(x.span.start);
      }
    }
  }
  return { starts, tight };
}

/** The canonical text, or null when the file cannot be formatted safely. */
export function formatText(a: DocumentAnalysis): string | null {
  if (a.diagnostics.some((d) => d.code === "spw-syntax" || d.code === "spw-character")) return null;
  const text = a.text;
  const eol = text.includes("\r\n") ? "\r\n" : "\n";
  const items: Item[] = [
    ...a.parsed.tokens.map((t: IToken) => ({ image: t.image, start: t.startOffset, end: (t.endOffset ?? t.startOffset) + 1, type: t.tokenType.name, isComment: false })),
    ...a.parsed.comments.map((c: IToken) => ({
      image: c.image.replace(/\s+$/, ""),
      start: c.startOffset,
      end: (c.endOffset ?? c.startOffset) + 1,
      type: "Comment",
      isComment: true,
    })),
  ].sort((x, y) => x.start - y.start);
  const { starts, tight } = statementStarts(a);
  const inTight = (x: Item): boolean => tight.some((s) => x.start >= s.start && x.end <= s.end);

  const out: string[] = [];
  let depth = 0;
  let previous: Item | undefined;
  let previousIndex = -1;
  for (let k = 0; k < items.length; k++) {
    const cur = items[k] as Item;
    if (cur.image === "}") depth = Math.max(0, depth - 1);
    if (!previous) {
      out.push(INDENT.repeat(depth) + cur.image);
      previous = cur;
      previousIndex = k;
      if (cur.image === "{") depth++;
      continue;
    }
    const gap = text.slice(previous.end, cur.start);
    const newlines = (gap.match(/\r\n|\r|\n/g) ?? []).length;
    // A comment on the same line as the token before it stays there (after `{` too).
    const sameLineComment = cur.isComment && newlines === 0;
    const forced = !sameLineComment && (starts.has(cur.start) || cur.image === "}" || previous.image === "{" || previous.isComment || previous.image === "}");
    if (forced || newlines > 0) {
      const blank = newlines >= 2 && previous.image !== "{" && cur.image !== "}";
      // A line that does not begin a statement continues the one above: one level deeper.
      let continuation = !forced;
      if (cur.isComment) {
        const next = items.slice(k + 1).find((x) => !x.isComment);
        continuation = continuation && next !== undefined && !starts.has(next.start) && next.image !== "}";
      }
      out.push(eol + (blank ? eol : "") + INDENT.repeat(depth + (continuation ? 1 : 0)) + cur.image);
    } else {
      out.push(spacing(items, k, previousIndex, inTight) + cur.image);
    }
    previous = cur;
    previousIndex = k;
    if (cur.image === "{") depth++;
  }
  const formatted = alignTrailingComments(out.join(""), eol) + (out.length > 0 ? eol : "");
  return sameTokens(text, formatted) ? formatted : null;
}

/** Where a line's trailing comment starts (a `#` outside a quoted name after some code), or -1. */
function trailingCommentAt(line: string): number {
  let quoted = false;
  for (let i = 0; i < line.length; i++) {
    const ch = line[i];
    if (ch === '"') quoted = !quoted;
    else if (ch === "#" && !quoted) return line.slice(0, i).trim() === "" ? -1 : i;
  }
  return -1;
}

/**
 * Trailing comments on consecutive lines start in one column, one space after the longest code
 * among them; a line without a trailing comment (or a blank line) ends the run. The rule depends
 * on the tokens only, so the result is canonical: aligned or not before, the same after.
 */
function alignTrailingComments(text: string, eol: string): string {
  const lines = text.split(eol);
  let k = 0;
  while (k < lines.length) {
    if (trailingCommentAt(lines[k] as string) < 0) {
      k++;
      continue;
    }
    let end = k;
    while (end < lines.length && trailingCommentAt(lines[end] as string) >= 0) end++;
    const parts = lines.slice(k, end).map((l) => {
      const at = trailingCommentAt(l);
      return { code: l.slice(0, at).trimEnd(), comment: l.slice(at) };
    });
    const column = Math.max(...parts.map((p) => [...p.code].length)) + 1;
    parts.forEach((p, i) => (lines[k + i] = p.code + " ".repeat(column - [...p.code].length) + p.comment));
    k = end;
  }
  return lines.join(eol);
}

function spacing(items: readonly Item[], k: number, pk: number, inTight: (x: Item) => boolean): string {
  const cur = items[k] as Item;
  const p = items[pk] as Item;
  const next = items[k + 1];
  if (cur.isComment) return " ";
  if (inTight(p) && inTight(cur)) return "";
  if (cur.image === "," || cur.image === ")" || cur.image === "]") return "";
  if (p.image === "(" || p.image === "[") return "";
  if (cur.image === "^" || p.image === "^") return "";
  if (isUnarySign(items, pk)) return "";
  if (cur.image === "(" && p.type === "Identifier") return "";
  // Spin lengths and simple fractions stay tight: `spin 1/2`, `3/2`.
  if (cur.image === "/" && p.type === "NumberLiteral" && next?.type === "NumberLiteral") return "";
  if (p.image === "/" && cur.type === "NumberLiteral" && items[pk - 1]?.type === "NumberLiteral") return "";
  return " ";
}

/** Formatting may only change white space: both texts must lex to the same tokens and comments. */
function sameTokens(before: string, after: string): boolean {
  const x = scanText(before);
  const y = scanText(after);
  if (x.errors.length > 0 || y.errors.length > 0 || x.tokens.length !== y.tokens.length) return false;
  for (let i = 0; i < x.tokens.length; i++) {
    const s = x.tokens[i] as IToken;
    const t = y.tokens[i] as IToken;
    if (s.image !== t.image || s.tokenType !== t.tokenType) return false;
    // A name right after a number on the same line is its unit: that line relation must hold.
    const s0 = x.tokens[i - 1];
    const t0 = y.tokens[i - 1];
    if (s0 && t0 && s.tokenType.name === "Identifier" && s0.tokenType.name === "NumberLiteral") {
      if ((s.startLine === s0.endLine) !== (t.startLine === t0.endLine)) return false;
    }
  }
  const cx = x.comments.map((c) => c.image.replace(/\s+$/, ""));
  const cy = y.comments.map((c) => c.image.replace(/\s+$/, ""));
  return cx.length === cy.length && cx.every((c, i) => c === cy[i]);
}
