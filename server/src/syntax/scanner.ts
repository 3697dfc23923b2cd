// The hand-written scanner of the .spw format: the same tokens, lines and error runs as a
// chevrotain Lexer built from the token definitions in lexer.ts (a property test holds it to that),
// at a fraction of the cost, and able to start at any token start. No token spans a line, so a
// text can be scanned piece by piece. Syntax layer: imports chevrotain types and lexer.ts only.
import type { IToken, TokenType } from "chevrotain";
import {
  Arrow,
  Caret,
  Comma,
  Comment,
  Equals,
  Identifier,
  KEYWORDS,
  Kw,
  LBrace,
  LBracket,
  LParen,
  Minus,
  NumberLiteral,
  Plus,
  RBrace,
  RBracket,
  RParen,
  Slash,
  Star,
  StringLiteral,
} from "./lexer";

/** A token as chevrotain's parser reads it (offsets inclusive at the end, lines one-based). */
export class SpwToken implements IToken {
  constructor(
    public image: string,
    public startOffset: number,
    public endOffset: number,
    public startLine: number,
    public endLine: number,
    public tokenType: TokenType,
    public tokenTypeIdx: number,
  ) {}
}

/** A run of characters that no token starts with (chevrotain's lexer reports the same runs). */
export interface LexError {
  readonly offset: number;
  readonly length: number;
  readonly line: number;
}

/** What `Scanner.next` found. */
export const END = 0;
export const TOKEN = 1;
export const COMMENT = 2;
export const ERROR = 3;

/**
 * Keywords by length, first and last character, so that an identifier is looked up without
 * cutting it out of the text (the block reader scans every identifier of the file, and most are
 * not keywords). A candidate is confirmed with startsWith at the same length.
 */
const KEYWORDS_BY_SHAPE = new Map<number, { readonly word: string; readonly type: TokenType }[]>();
function shapeKey(length: number, first: number, last: number): number {
  return (length * 65536 + first) * 65536 + last;
}
for (const w of KEYWORDS) {
  const key = shapeKey(w.length, w.charCodeAt(0), w.charCodeAt(w.length - 1));
  const list = KEYWORDS_BY_SHAPE.get(key) ?? [];
  list.push({ word: w, type: Kw[w] });
  KEYWORDS_BY_SHAPE.set(key, list);
}
const LONGEST_KEYWORD = Math.max(...KEYWORDS.map((w) => w.length));

/** Single-character punctuation by character code. */
const PUNCTUATION: (TokenType | undefined)[] = [];
for (const [ch, type] of [
  ["{", LBrace],
  ["}", RBrace],
  ["(", LParen],
  [")", RParen],
  ["[", LBracket],
  ["]", RBracket],
  [",", Comma],
  ["=", Equals],
  ["+", Plus],
  ["*", Star],
  ["/", Slash],
  ["^", Caret],
] as const)
  PUNCTUATION[ch.charCodeAt(0)] = type;

function isDigit(c: number): boolean {
  return c >= 48 && c <= 57;
}

function isIdentStart(c: number): boolean {
  return (c >= 65 && c <= 90) || (c >= 97 && c <= 122) || c === 95;
}

function isIdentPart(c: number): boolean {
  return isIdentStart(c) || isDigit(c);
}

function isSpace(c: number): boolean {
  return c === 32 || c === 9 || c === 10 || c === 13 || c === 12 || c === 11 || c === 0xa0 || c === 0xfeff;
}

/**
 * Walks a text one token at a time without allocating: after `next()` the fields `kind`, `type`,
 * `start`, `end` (exclusive) and `line` describe what was found. Whitespace is skipped, lines are
 * counted (\n, \r\n and a lone \r each end one).
 */
export class Scanner {
  /** END, TOKEN, COMMENT or ERROR. */
  kind = END;
  /** The token's type (TOKEN and COMMENT only). */
  type: TokenType = Identifier;
  start = 0;
  end = 0;
  /** One-based line of the token's start. */
  line = 1;
  private pos: number;

  constructor(
    private readonly text: string,
    from = 0,
    private readonly limit = text.length,
    private currentLine = 1,
  ) {
    this.pos = from;
  }

  /** Offset just after what `next()` consumed (whitespace after a token is not consumed yet). */
  get offset(): number {
    return this.pos;
  }

  next(): number {
    const text = this.text;
    const limit = this.limit;
    let p = this.pos;
    // Whitespace, counting lines.
    while (p < limit) {
      const c = text.charCodeAt(p);
      if (c === 10) this.currentLine++;
      else if (c === 13) {
        if (p + 1 < limit && text.charCodeAt(p + 1) === 10) p++;
        this.currentLine++;
      } else if (!isSpace(c)) break;
      p++;
    }
    this.start = p;
    this.line = this.currentLine;
    if (p >= limit) {
      this.pos = p;
      this.kind = END;
      return END;
    }
    const found = this.tokenAt(p);
    if (found > p) {
      this.pos = this.end = found;
      return this.kind;
    }
    // An error run: characters where no token starts, up to the next place where one does.
    let q = p + 1;
    while (q < limit && !isSpace(text.charCodeAt(q)) && this.tokenAt(q) === q) q++;
    this.pos = this.end = q;
    this.kind = ERROR;
    return ERROR;
  }

  /** The end of the token starting at `p` (setting kind and type), or `p` if none starts there. */
  private tokenAt(p: number): number {
    const text = this.text;
    const limit = this.limit;
    const c = text.charCodeAt(p);
    if (isIdentStart(c)) {
      let q = p + 1;
      while (q < limit && isIdentPart(text.charCodeAt(q))) q++;
      this.kind = TOKEN;
      let type: TokenType = Identifier;
      const length = q - p;
      if (length <= LONGEST_KEYWORD) {
        const candidates = KEYWORDS_BY_SHAPE.get(shapeKey(length, c, text.charCodeAt(q - 1)));
        if (candidates) for (const k of candidates) if (text.startsWith(k.word, p)) type = k.type;
      }
      this.type = type;
      return q;
    }
    if (isDigit(c) || (c === 46 && p + 1 < limit && isDigit(text.charCodeAt(p + 1)))) {
      let q = p;
      if (c === 46) {
        q++;
        while (q < limit && isDigit(text.charCodeAt(q))) q++;
      } else {
        while (q < limit && isDigit(text.charCodeAt(q))) q++;
        if (q < limit && text.charCodeAt(q) === 46) {
          q++;
          while (q < limit && isDigit(text.charCodeAt(q))) q++;
        }
      }
      // An exponent only when digits follow (`1e` is the number 1 and the name e).
      const e = q < limit ? text.charCodeAt(q) : 0;
      if (e === 101 || e === 69) {
        let r = q + 1;
        const s = r < limit ? text.charCodeAt(r) : 0;
        if (s === 43 || s === 45) r++;
        if (r < limit && isDigit(text.charCodeAt(r))) {
          while (r < limit && isDigit(text.charCodeAt(r))) r++;
          q = r;
        }
      }
      this.kind = TOKEN;
      this.type = NumberLiteral;
      return q;
    }
    if (c === 35) {
      let q = p + 1;
      while (q < limit) {
        const d = text.charCodeAt(q);
        if (d === 10 || d === 13) break;
        q++;
      }
      this.kind = COMMENT;
      this.type = Comment;
      return q;
    }
    if (c === 34) {
      let q = p + 1;
      while (q < limit) {
        const d = text.charCodeAt(q);
        if (d === 34) {
          this.kind = TOKEN;
          this.type = StringLiteral;
          return q + 1;
        }
        if (d === 10 || d === 13) break;
        q++;
      }
      return p;
    }
    if (c === 45) {
      this.kind = TOKEN;
      if (p + 1 < limit && text.charCodeAt(p + 1) === 62) {
        this.type = Arrow;
        return p + 2;
      }
      this.type = Minus;
      return p + 1;
    }
    const punctuation = PUNCTUATION[c];
    if (punctuation) {
      this.kind = TOKEN;
      this.type = punctuation;
      return p + 1;
    }
    return p;
  }
}

export interface ScanResult {
  readonly tokens: SpwToken[];
  readonly comments: SpwToken[];
  readonly errors: LexError[];
}

/**
 * Tokens, comments and error runs of `text[from, to)`, with offsets less `base` (by default
 * relative to `from`) and lines counted from `firstLine` at `from`.
 */
export function scanText(text: string, from = 0, to = text.length, base = from, firstLine = 1): ScanResult {
  const scanner = new Scanner(text, from, to, firstLine);
  const tokens: SpwToken[] = [];
  const comments: SpwToken[] = [];
  const errors: LexError[] = [];
  for (let kind = scanner.next(); kind !== END; kind = scanner.next()) {
    const start = scanner.start - base;
    if (kind === ERROR) {
      errors.push({ offset: start, length: scanner.end - scanner.start, line: scanner.line });
      continue;
    }
    const type = scanner.type;
    const token = new SpwToken(text.slice(scanner.start, scanner.end), start, scanner.end - base - 1, scanner.line, scanner.line, type, type.tokenTypeIdx as number);
    (kind === COMMENT ? comments : tokens).push(token);
  }
  return { tokens, comments, errors };
}
