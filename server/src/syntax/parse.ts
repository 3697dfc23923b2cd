// Entry point of the syntax layer: text -> tokens -> tree, always returning a tree and a list of
// syntax diagnostics, never throwing. The block structure (`model "name" { ... }`) is read here by
// a small state machine that cuts the block's body into statement pieces, each starting at a
// statement keyword; each piece is parsed alone by the chevrotain grammar (parser.ts). A piece's
// tree depends on its text only. Parsing a new version of a file with the parse of the version
// before rereads the text from the piece the edit touches until the pieces line up again, and
// reuses every other piece as it is: a keystroke reparses one statement. Syntax layer.
import type { IToken, TokenType } from "chevrotain";
import { diag, type Diagnostic } from "../base/diagnostics";
import type { Span } from "../base/text";
import { copyStatement, forEachSpan, shiftSpan, type ModelBlock, type NameRef, type SpwFile, type Statement } from "./ast";
import { Identifier, Kw, LBrace, NumberLiteral, RBrace, STATEMENT_KEYWORDS, StringLiteral } from "./lexer";
import { lowerPiece } from "./lower";
import { spwParser, STATEMENT_STARTS } from "./parser";
import { COMMENT, END, ERROR, Scanner, scanText, SpwToken, type ScanResult } from "./scanner";

export interface ParsedFile {
  readonly ast: SpwFile;
  readonly diagnostics: readonly Diagnostic[];
  /** Every token but comments, in order (built on first use). */
  readonly tokens: readonly IToken[];
  /** Every comment, in order (built on first use). */
  readonly comments: readonly IToken[];
  /**
   * The token that contains `offset` or ends right at it (the word the cursor touches); at a
   * boundary a word on the right wins over punctuation on the left (`J1|)` is J1).
   */
  tokenAt(offset: number): IToken | undefined;
}

/**
 * Parses `text`. With `previous`, the parse of the version before, only the text around the edit
 * is read again, and the result is the same either way (a property test holds the two to that).
 * Reuse moves the previous version's trees and tokens in place, as TypeScript's incremental
 * parser does with its syntax trees, so `previous` must not be read afterwards; a `previous` that
 * is not the newest parse of its document is not reused.
 */
export function parseSpw(text: string, previous?: ParsedFile): ParsedFile {
  const reusable = previous instanceof SpwParse && previous.isNewest() ? previous : null;
  return new SpwParse(text, reusable);
}

// ---- pieces ---------------------------------------------------------------------------------

/** The successive parses of one document share a lineage: the newest parse and the piece cache. */
class Lineage {
  generation = 0;
  /** Piece texts seen recently and their parses. */
  readonly pieces = new Map<string, PieceResult>();
}

/**
 * The parse of one statement piece. Diagnostics and errors are relative to the piece's start;
 * statements and tokens sit where the piece was last placed and are moved in place when it moves.
 */
interface PieceResult {
  readonly diagnostics: readonly Diagnostic[];
  readonly syntaxErrors: readonly PieceSyntaxError[];
  readonly statements: readonly Statement[];
  /**
   * Every span object of `statements`, listed once when the piece is parsed: moving the piece
   * shifts these without walking the trees (an edit near the top of a file moves every statement
   * after it, and a walk would visit each node of each of them).
   */
  readonly spans: readonly Span[];
  /** Where `statements` sit: the piece's offset in the file that placed it last. */
  start: number;
  /** The piece's last token, relative to its start (lines from 1): where a missing '}' belongs. */
  readonly lastToken: TokenRef | null;
  /** The parse (generation of its lineage) that placed the piece last. */
  generation: number;
}

interface TokenRef {
  readonly start: number;
  readonly end: number;
  readonly image: string;
  readonly line: number;
}

/** A token as the block reader sees it. */
interface TypedRef extends TokenRef {
  readonly type: TokenType;
}

/** A grammar error inside a piece; `token` null when the piece ended where more was expected. */
interface PieceSyntaxError {
  readonly raw: string;
  /** The grammar rule the error happened in (e.g. "bondSpec"), for naming what was expected. */
  readonly rule: string | null;
  readonly token: TokenRef | null;
  readonly previous: TokenRef | null;
}

type PieceKind = "top" | "header" | "statements" | "close";

/** Where the block reader is: outside blocks, in a header, in a body, inside `lattice { }`. */
type ReadState = "top" | "header" | "body" | "lattice";

/**
 * A stretch of the text from one token start to the next piece's start. A new version of the file
 * takes over the previous version's pieces (moving those after the edit), so positions change.
 */
interface Piece {
  readonly kind: PieceKind;
  start: number;
  end: number;
  /** One-based line of `start`. */
  line: number;
  /** Length and type of the first token (0 and null for a leading top piece without tokens). */
  readonly firstLength: number;
  readonly firstType: TokenType | null;
  /** The reader before the first token: where the next version may take up the old pieces. */
  readonly entry: ReadState;
  readonly entryAfterLattice: boolean;
  /** A '}' was waiting for this token to tell whether it closed the block. */
  readonly entryPending: boolean;
  /** Blocks opened before this piece (its own header not counted). */
  readonly blocksBefore: number;
  result: PieceResult | null;
  /**
   * The piece's tokens in file positions: for header, close and top pieces scanned with every
   * parse; for statement pieces scanned again when asked for (tokens are cheap to make and costly
   * to keep), and dropped when the piece moves.
   */
  scan: ScanResult | null;
}

interface BlockLayout {
  readonly headerPiece: Piece;
  readonly model: TypedRef;
  /** Tokens after `model` on its line, up to '{'. */
  readonly headerTokens: TypedRef[];
  name: TypedRef | null;
  nameQuoted: boolean;
  brace: TypedRef | null;
  /** Errors of the header. */
  readonly diagnostics: Diagnostic[];
  readonly pieces: Piece[];
  close: TypedRef | null;
  /** The last token of the block (set when the block ends). */
  last: TokenRef | null;
  /** A missing '}': the token found instead (null at the end of the file). */
  closeError: { readonly found: TokenRef | null; readonly previous: TokenRef } | null;
  /** Where the block ends: its '}', or its last token. */
  end: number;
}

const STATEMENT_START_SET = new Set(STATEMENT_STARTS);

function parsePiece(text: string): PieceResult {
  const scan = scanText(text);
  const diagnostics: Diagnostic[] = [];
  for (const e of scan.errors) diagnostics.push(characterDiagnostic(text, e.offset, e.length));
  spwParser.input = scan.tokens;
  const cst = spwParser.piece();
  const syntaxErrors: PieceSyntaxError[] = spwParser.errors.map((e) => {
    const t = e.token;
    const atEnd = t.tokenType?.name === "EOF" || !Number.isFinite(t.startOffset);
    const p = (e as { previousToken?: IToken }).previousToken;
    return {
      raw: e.message,
      rule: e.context?.ruleStack?.[e.context.ruleStack.length - 1] ?? null,
      token: atEnd ? null : { start: t.startOffset, end: (t.endOffset ?? t.startOffset) + 1, image: t.image, line: t.startLine ?? 1 },
      previous:
        p && Number.isFinite(p.startOffset) && !p.isInsertedInRecovery
          ? { start: p.startOffset, end: (p.endOffset ?? p.startOffset) + 1, image: p.image, line: p.endLine ?? 1 }
          : null,
    };
  });
  const lowered = lowerPiece(cst, text);
  diagnostics.push(...lowered.diagnostics);
  return {
    diagnostics,
    syntaxErrors,
    statements: lowered.statements,
    spans: spansOf(lowered.statements),
    start: 0,
    lastToken: lastOf(scan.tokens),
    generation: -1,
  };
}

function lastOf(tokens: readonly SpwToken[]): TokenRef | null {
  const t = tokens[tokens.length - 1];
  return t ? { start: t.startOffset, end: t.endOffset + 1, image: t.image, line: t.startLine } : null;
}

/** A second, independent copy of a piece's parse (the same text twice in one file). */
function clonePiece(r: PieceResult): PieceResult {
  const statements = r.statements.map((s) => copyStatement(s, 0));
  return { ...r, statements, spans: spansOf(statements), generation: -1 };
}

function spansOf(statements: readonly Statement[]): Span[] {
  const spans: Span[] = [];
  const add = (span: Span): void => {
    spans.push(span);
  };
  for (const st of statements) forEachSpan(st, add);
  return spans;
}

/** Moves a piece's statements by `delta` characters, in place. */
function moveSpans(spans: readonly Span[], delta: number): void {
  for (let i = 0; i < spans.length; i++) {
    const m = spans[i] as { start: number; end: number };
    m.start += delta;
    m.end += delta;
  }
}

function characterDiagnostic(text: string, offset: number, length: number, delta = 0): Diagnostic {
  const ch = text.slice(offset, offset + Math.max(1, length));
  return diag(
    "spw-character",
    { start: offset + delta, end: offset + Math.max(1, length) + delta },
    `Unexpected character ${JSON.stringify(ch)}: .spw uses # for comments, "..." for the model name, and ( ) [ ] { } , = + - * / ^ -> as punctuation.`,
  );
}

function shiftDiagnostic(d: Diagnostic, delta: number): Diagnostic {
  if (delta === 0) return d;
  const moved = { ...d, span: shiftSpan(d.span, delta) };
  return d.related ? { ...moved, related: d.related.map((r) => ({ span: shiftSpan(r.span, delta), message: r.message })) } : moved;
}

function shiftRef<T extends TokenRef>(t: T, delta: number, lines: number): T {
  // Written out (a spread of these small objects is several times slower); a TypedRef keeps its type.
  const type = (t as Partial<TypedRef>).type;
  const moved = type === undefined ? { start: t.start + delta, end: t.end + delta, line: t.line + lines, image: t.image } : { start: t.start + delta, end: t.end + delta, line: t.line + lines, image: t.image, type };
  return moved as T;
}

/** A block of the previous version moved by `delta` characters and `lines` lines (its pieces move themselves). */
function shiftBlock(b: BlockLayout, delta: number, lines: number): BlockLayout {
  const ref = <T extends TokenRef>(t: T | null): T | null => (t ? shiftRef(t, delta, lines) : null);
  return {
    headerPiece: b.headerPiece,
    model: shiftRef(b.model, delta, lines),
    headerTokens: b.headerTokens.map((t) => shiftRef(t, delta, lines)),
    name: ref(b.name),
    nameQuoted: b.nameQuoted,
    brace: ref(b.brace),
    diagnostics: b.diagnostics.map((d) => shiftDiagnostic(d, delta)),
    pieces: b.pieces,
    close: ref(b.close),
    last: ref(b.last),
    closeError: b.closeError ? { found: ref(b.closeError.found), previous: shiftRef(b.closeError.previous, delta, lines) } : null,
    end: b.end + delta,
  };
}

/**
 * Where a missing or wrong token is reported: on the token found instead, or, when that sits on a
 * later line (or the text ended), just after the token before it, where the missing one belongs.
 */
function missingSpan(found: TokenRef | null, previous: TokenRef | null, textLength: number): Span {
  if (previous && (found === null || found.line > previous.line)) return { start: Math.max(previous.start, previous.end - 1), end: previous.end };
  return found ? { start: found.start, end: found.end } : { start: textLength, end: textLength };
}

function foundText(found: TokenRef | null): string {
  return found ? `'${found.image}'` : "the end of the file";
}

/** Where two texts differ: the lengths of their common start and of their common end. */
function commonEnds(a: string, b: string): { prefix: number; suffix: number } {
  const max = Math.min(a.length, b.length);
  let prefix = 0;
  while (prefix < max && a.charCodeAt(prefix) === b.charCodeAt(prefix)) prefix++;
  // A plain insertion or deletion keeps all the rest: one native comparison says so.
  const rest = max - prefix;
  if (a.slice(a.length - rest) === b.slice(b.length - rest)) return { prefix, suffix: rest };
  let suffix = 0;
  while (suffix < rest && a.charCodeAt(a.length - 1 - suffix) === b.charCodeAt(b.length - 1 - suffix)) suffix++;
  return { prefix, suffix };
}

/** Where reading starts again in a new version: from old piece `index`, the pieces before it kept. */
interface Resume {
  readonly previous: SpwParse;
  readonly index: number;
  /** The edit: old text [changeStart, changeStart + oldLength) became [changeStart, newEnd). */
  readonly newEnd: number;
  readonly delta: number;
}

// ---- the whole file -------------------------------------------------------------------------

class SpwParse implements ParsedFile {
  readonly ast: SpwFile;
  readonly diagnostics: readonly Diagnostic[];
  readonly pieces: Piece[] = [];
  readonly blocks: BlockLayout[] = [];
  private readonly lineage: Lineage;
  private readonly generation: number;
  private tokenList: IToken[] | null = null;
  private commentList: IToken[] | null = null;

  constructor(
    readonly text: string,
    previous: SpwParse | null,
  ) {
    this.lineage = previous ? previous.lineage : new Lineage();
    this.generation = ++this.lineage.generation;
    this.read(previous ? this.resumePoint(previous) : null);
    const cache = this.lineage.pieces;
    const lexical: Diagnostic[] = [];
    const syntax: Diagnostic[] = [];
    const stray: Diagnostic[] = [];
    const pieces = this.pieces;
    for (let i = 0; i < pieces.length; i++) {
      const piece = pieces[i] as Piece;
      if (piece.kind !== "statements") {
        // Header, close and top pieces are a few tokens: scanned each time, in file positions.
        const scan = scanText(text, piece.start, piece.end, 0, piece.line);
        piece.scan = scan;
        for (const e of scan.errors) lexical.push(characterDiagnostic(text, e.offset, e.length));
        continue;
      }
      let result = piece.result;
      if (!result) {
        const pieceText = text.slice(piece.start, piece.end);
        result = cache.get(pieceText) ?? null;
        if (!result) {
          result = parsePiece(pieceText);
          cache.set(pieceText, result);
        }
      }
      // The same text twice in one file: the second piece needs trees of its own.
      if (result.generation === this.generation) result = clonePiece(result);
      result.generation = this.generation;
      if (result.start !== piece.start) {
        moveSpans(result.spans, piece.start - result.start);
        result.start = piece.start;
      }
      piece.result = result;
      for (const d of result.diagnostics) (d.code === "spw-character" ? lexical : stray).push(shiftDiagnostic(d, piece.start));
      if (result.syntaxErrors.length > 0) {
        const follow = this.firstToken(i + 1);
        for (const e of result.syntaxErrors) {
          const d = this.pieceSyntaxDiagnostic(piece, e, follow);
          if (d) syntax.push(d);
        }
      }
    }
    // Keep the cache to about the pieces in use (texts of older versions pile up while typing).
    if (cache.size > 2 * pieces.length + 64) {
      cache.clear();
      for (const piece of pieces) if (piece.result) cache.set(text.slice(piece.start, piece.end), piece.result);
    }
    const models: ModelBlock[] = this.blocks.map((b) => this.modelBlock(b, syntax));
    stray.push(...this.topLevelStrays());
    this.ast = { models, span: { start: 0, end: text.length } };
    // Stray tokens that start where a grammar error does are what the parser's recovery skipped
    // there: the grammar error ("Expected 'shell' or a site name here, found '->'") says it.
    const errorAt = syntax.length > 0 ? new Set(syntax.map((d) => d.span.start)) : null;
    this.diagnostics = [...lexical, ...syntax, ...(errorAt ? stray.filter((d) => d.code !== "spw-syntax" || !errorAt.has(d.span.start)) : stray)];
  }

  /** True while no newer parse of the same document has taken over (and moved) this one's pieces. */
  isNewest(): boolean {
    return this.lineage.generation === this.generation;
  }

  /** The first token of piece `i`, or null past the last piece. */
  private firstToken(i: number): TokenRef | null {
    const p = this.pieces[i];
    if (!p || !p.firstType) return null;
    return { start: p.start, end: p.start + p.firstLength, image: this.text.slice(p.start, p.start + p.firstLength), line: p.line };
  }

  /**
   * Where to read again after an edit: from the last old piece that starts before the line of the
   * first changed character, or an earlier one where the reader's state is plain.
   */
  private resumePoint(previous: SpwParse): Resume {
    const { prefix, suffix } = commonEnds(previous.text, this.text);
    const old = previous.pieces;
    // Tokens never cross a line end, but a quote typed late in a line can close one opened
    // earlier in it: read again from the line break before the edit's line.
    const oldText = previous.text;
    const at = Math.max(0, oldText.lastIndexOf("\n", prefix - 1), oldText.lastIndexOf("\r", prefix - 1));
    let lo = 0;
    let hi = old.length - 1;
    while (lo < hi) {
      const mid = (lo + hi + 1) >> 1;
      if ((old[mid] as Piece).start <= at) lo = mid;
      else hi = mid - 1;
    }
    // Only where the reader was in a plain state: not in a header, no '}' waiting.
    let index = lo;
    while (index > 0 && ((old[index] as Piece).entryPending || (old[index] as Piece).entry === "header")) index--;
    return { previous, index, newEnd: this.text.length - suffix, delta: this.text.length - previous.text.length };
  }

  /**
   * Reads the block structure and cuts the text into pieces: `model`, a quoted name, `{`, the
   * statements, `}`. Inside a block a piece starts at every statement keyword, except `spin`
   * inside the braces of a custom lattice (`site A = (0, 0, 0) spin 1`, also after a stray name,
   * `lattice custom {`), where only `}` or another statement keyword ends the lattice. A '}'
   * followed by more code on its own line is a stray
   * (`exchange }heisenberg(J)`), not the end of the block. What is missing is reported, and
   * reading goes on as if it were there. After an edit, reading starts at `resume` and stops where
   * a piece starts at the place of an old piece, after the edit, in the same state: from there on
   * the old pieces are the new ones, moved.
   */
  private read(resume: Resume | null): void {
    const text = this.text;
    const pieces = this.pieces;
    const blocks = this.blocks;
    let state: ReadState = "top";
    let afterLatticeKeyword = false;
    let block: BlockLayout | null = null;
    // A '}' in the body waits for the next token to tell whether it closes the block.
    let pendingClose: TypedRef | null = null;
    // The reader before the token being read: what a piece opened for it records.
    let entry: ReadState = "top";
    let entryAfterLattice = false;
    let entryPending = false;
    // The last token of the block (for the place of a missing '}'), kept as numbers: most tokens
    // need no object of their own.
    let lastStart = 0;
    let lastEnd = 0;
    let lastLine = 1;
    let scanFrom = 0;
    let scanLine = 1;
    let current: Piece;
    // Set when the new version's pieces line up with the old ones again: reading stops there
    // (every step returns at once, without touching the pieces and blocks lineUp completed).
    let linedUp = false;
    const old = resume?.previous ?? null;
    let oldIndex = resume ? resume.index : 0;

    if (resume && old && resume.index > 0) {
      const first = old.pieces[resume.index] as Piece;
      for (let i = 0; i < resume.index; i++) pieces.push(old.pieces[i] as Piece);
      state = first.entry;
      afterLatticeKeyword = first.entryAfterLattice;
      if (first.entry === "top") for (let i = 0; i < first.blocksBefore; i++) blocks.push(old.blocks[i] as BlockLayout);
      else {
        // Inside a body: reopen the block, with its pieces before this one.
        for (let i = 0; i < first.blocksBefore - 1; i++) blocks.push(old.blocks[i] as BlockLayout);
        const ob = old.blocks[first.blocksBefore - 1] as BlockLayout;
        const at = ob.pieces.indexOf(first);
        block = {
          headerPiece: ob.headerPiece,
          model: ob.model,
          headerTokens: ob.headerTokens,
          name: ob.name,
          nameQuoted: ob.nameQuoted,
          brace: ob.brace,
          diagnostics: ob.diagnostics,
          pieces: ob.pieces.slice(0, at < 0 ? ob.pieces.length : at),
          close: null,
          last: null,
          closeError: null,
          end: 0,
        };
        blocks.push(block);
      }
      // The piece before may grow (a stray word typed after it joins it): it is read again, and
      // the block it belongs to (the last one kept) points to the new piece.
      const before = pieces[pieces.length - 1] as Piece;
      const again: Piece = {
        kind: before.kind,
        start: before.start,
        end: text.length,
        line: before.line,
        firstLength: before.firstLength,
        firstType: before.firstType,
        entry: before.entry,
        entryAfterLattice: before.entryAfterLattice,
        entryPending: before.entryPending,
        blocksBefore: before.blocksBefore,
        result: null,
        scan: null,
      };
      pieces[pieces.length - 1] = again;
      current = again;
      const owner = blocks[blocks.length - 1];
      if (owner && (owner.headerPiece === before || owner.pieces[owner.pieces.length - 1] === before)) {
        const replaced: BlockLayout = {
          ...owner,
          headerPiece: owner.headerPiece === before ? again : owner.headerPiece,
          pieces: owner.pieces.map((p) => (p === before ? again : p)),
        };
        blocks[blocks.length - 1] = replaced;
        if (block === owner) block = replaced;
      }
      if (block) {
        const last = this.lastTokenOf(before, block);
        lastStart = last.start;
        lastEnd = last.end;
        lastLine = last.line;
      }
      scanFrom = first.start;
      scanLine = first.line;
    } else {
      current = { kind: "top", start: 0, end: text.length, line: 1, firstLength: 0, firstType: null, entry: "top", entryAfterLattice: false, entryPending: false, blocksBefore: 0, result: null, scan: null };
      pieces.push(current);
    }

    const lastRef = (): TokenRef => ({ start: lastStart, end: lastEnd, line: lastLine, image: text.slice(lastStart, lastEnd) });
    const ref = (start: number, end: number, line: number, type: TokenType): TypedRef => ({ start, end, line, image: text.slice(start, end), type });
    const setLast = (t: TokenRef): void => {
      lastStart = t.start;
      lastEnd = t.end;
      lastLine = t.line;
    };

    /** From old piece `o` on, the old pieces and blocks are the new ones, moved. */
    const lineUp = (o: Piece, start: number, line: number): void => {
      if (!old || !resume) return;
      const delta = resume.delta;
      const lines = line - o.line;
      current.end = start;
      for (let k = oldIndex; k < old.pieces.length; k++) {
        const p = old.pieces[k] as Piece;
        p.start += delta;
        p.end += delta;
        p.line += lines;
        p.scan = null;
        pieces.push(p);
      }
      // Inside a body: the rest of the old block, or its '}'. (A header met in a body has ended
      // the block already.)
      if (block && o.kind === "statements") {
        const b: BlockLayout = block;
        const ob = old.blocks[o.blocksBefore - 1] as BlockLayout;
        for (let k = ob.pieces.indexOf(o); k < ob.pieces.length; k++) b.pieces.push(ob.pieces[k] as Piece);
        const moved = shiftBlock(ob, delta, lines);
        b.close = moved.close;
        b.last = moved.last;
        b.closeError = moved.closeError;
        b.end = moved.end;
      } else if (block && o.kind === "close") {
        const b: BlockLayout = block;
        b.close = { start, end: start + o.firstLength, image: "}", line, type: RBrace };
        b.last = lastRef();
        b.end = start + o.firstLength;
      }
      for (let k = o.blocksBefore; k < old.blocks.length; k++) blocks.push(shiftBlock(old.blocks[k] as BlockLayout, delta, lines));
      linedUp = true;
    };

    const open = (kind: PieceKind, t: TypedRef): Piece => {
      if (resume && old && !entryPending && t.start >= resume.newEnd) {
        const oldStart = t.start - resume.delta;
        while (oldIndex < old.pieces.length && (old.pieces[oldIndex] as Piece).start < oldStart) oldIndex++;
        const o = old.pieces[oldIndex];
        if (o && o.start === oldStart && o.kind === kind && !o.entryPending && o.entry === entry && o.entryAfterLattice === entryAfterLattice && o.blocksBefore === blocks.length) {
          lineUp(o, t.start, t.line);
          return current;
        }
      }
      current.end = t.start;
      current = {
        kind,
        start: t.start,
        end: text.length,
        line: t.line,
        firstLength: t.end - t.start,
        firstType: t.type,
        entry,
        entryAfterLattice,
        entryPending,
        blocksBefore: blocks.length,
        result: null,
        scan: null,
      };
      pieces.push(current);
      return current;
    };

    /** A token of the body; an object is made for it only when it starts a piece. */
    const bodyToken = (b: BlockLayout, type: TokenType, start: number, end: number, line: number): void => {
      if (state === "lattice" && (type === RBrace || type === Kw.spin || !STATEMENT_START_SET.has(type))) {
        if (type === RBrace) state = "body";
      } else if (STATEMENT_START_SET.has(type)) {
        const piece = open("statements", ref(start, end, line, type));
        if (linedUp) return;
        b.pieces.push(piece);
        state = "body";
      } else if (current.kind !== "statements") {
        // Stray tokens before the first statement keyword form a piece of their own.
        const piece = open("statements", ref(start, end, line, type));
        if (linedUp) return;
        b.pieces.push(piece);
      } else if (afterLatticeKeyword && type === LBrace) state = "lattice";
      // Up to its '{', a lattice statement may hold a stray name (`lattice custom {`): the braces
      // still enclose the cell, so that their '}' does not end the model.
      afterLatticeKeyword = type === Kw.lattice || (afterLatticeKeyword && type !== LBrace && type !== RBrace && !STATEMENT_START_SET.has(type));
      lastStart = start;
      lastEnd = end;
      lastLine = line;
    };

    const step = (t: TypedRef | null): void => {
      if (pendingClose) {
        const close: TypedRef = pendingClose;
        const b = block as BlockLayout;
        pendingClose = null;
        if (t && t.line === close.line && t.type !== Kw.model) {
          bodyToken(b, close.type, close.start, close.end, close.line);
          if (linedUp) return;
        } else {
          open("close", close);
          if (linedUp) return;
          b.close = close;
          b.last = lastRef();
          b.end = close.end;
          state = "top";
          block = null;
        }
      }
      if (!t) return;
      if (state === "top") {
        if (t.type === Kw.model) {
          const headerPiece = open("header", t);
          if (linedUp) return;
          block = { headerPiece, model: t, headerTokens: [], name: null, nameQuoted: false, brace: null, diagnostics: [], pieces: [], close: null, last: null, closeError: null, end: t.end };
          blocks.push(block);
          setLast(t);
          state = "header";
        } else if (current.kind !== "top") open("top", t);
        return;
      }
      const b = block as BlockLayout;
      if (state === "header") {
        if (t.type === LBrace) {
          b.brace = t;
          this.readHeader(b, t, lastRef());
          setLast(t);
          state = "body";
          return;
        }
        // The header is the line of `model` (its '{' may open the next line).
        if (t.line === b.model.line && t.type !== RBrace && t.type !== Kw.model && !STATEMENT_START_SET.has(t.type)) {
          b.headerTokens.push(t);
          setLast(t);
          return;
        }
        this.readHeader(b, t, lastRef());
        state = "body";
      }
      if (t.type === Kw.model) {
        const previousToken = lastRef();
        b.closeError = { found: t, previous: previousToken };
        b.last = previousToken;
        b.end = previousToken.end;
        state = "top";
        block = null;
        step(t);
        return;
      }
      if (t.type === RBrace && state === "body") pendingClose = t;
      else bodyToken(b, t.type, t.start, t.end, t.line);
    };

    const scanner = new Scanner(text, scanFrom, text.length, scanLine);
    for (let kind = scanner.next(); kind !== END; kind = scanner.next()) {
      if (kind === COMMENT || kind === ERROR) continue;
      const type = scanner.type;
      entry = state;
      entryAfterLattice = afterLatticeKeyword;
      entryPending = pendingClose !== null;
      // The common case, a token inside a statement, without making an object for it.
      if ((state === "body" || state === "lattice") && pendingClose === null && type !== Kw.model && type !== RBrace && !STATEMENT_START_SET.has(type)) {
        bodyToken(block as BlockLayout, type, scanner.start, scanner.end, scanner.line);
      } else step(ref(scanner.start, scanner.end, scanner.line, type));
      if (linedUp) return;
    }
    entry = state;
    entryAfterLattice = afterLatticeKeyword;
    entryPending = pendingClose !== null;
    step(null);
    if (linedUp) return;
    const last: BlockLayout | null = block;
    if (last) {
      const previousToken = lastRef();
      if (state === "header") this.readHeader(last, null, previousToken);
      else last.closeError = { found: null, previous: previousToken };
      last.last = previousToken;
      last.end = previousToken.end;
    }
  }

  /** The last token of a piece of `block` (its header or one of its statement pieces). */
  private lastTokenOf(piece: Piece, block: BlockLayout): TokenRef {
    const t = piece.kind === "statements" ? piece.result?.lastToken : null;
    if (t) return { start: t.start + piece.start, end: t.end + piece.start, image: t.image, line: t.line + piece.line - 1 };
    return block.brace ?? block.headerTokens[block.headerTokens.length - 1] ?? block.model;
  }

  /**
   * Reads the tokens between `model` and '{' (or `stop`, where the body begins without one): the
   * name, and what does not belong there.
   */
  private readHeader(b: BlockLayout, stop: TypedRef | null, previous: TokenRef): void {
    const tokens = b.headerTokens;
    const name = tokens.find((t) => t.type === StringLiteral) ?? tokens.find((t) => t.type === Identifier || t.type === NumberLiteral) ?? null;
    const out = b.diagnostics;
    const length = this.text.length;
    b.name = name;
    b.nameQuoted = name?.type === StringLiteral;
    if (!name) {
      const found = tokens[0] ?? (b.brace ? b.brace : stop);
      out.push(diag("spw-syntax", missingSpan(found, b.model, length), `Expected a quoted name here, found ${foundText(found)}.`));
    } else if (!b.nameQuoted) out.push(diag("spw-syntax", { start: name.start, end: name.end }, `The model name goes in quotes: model "${name.image}" { ... }.`));
    // Anything else before '{', one diagnostic a line.
    let run: Span | null = null;
    let runLine = 0;
    const flush = (): void => {
      if (run) out.push(diag("spw-syntax", run, `Unexpected '${this.text.slice(run.start, run.end)}' in the model header, which reads model "name" {.`));
      run = null;
    };
    for (const t of tokens) {
      if (t === name) continue;
      if (run && t.line === runLine) run = { start: (run as Span).start, end: t.end };
      else {
        flush();
        run = { start: t.start, end: t.end };
        runLine = t.line;
      }
    }
    flush();
    if (!b.brace && name) out.push(diag("spw-syntax", missingSpan(stop, previous, length), `Expected '{' here, found ${foundText(stop)}.`));
  }

  /** The diagnostic of a grammar error; null when the stray-token report says it already (see latticeEntryError). */
  private pieceSyntaxDiagnostic(piece: Piece, e: PieceSyntaxError, follow: TokenRef | null): Diagnostic | null {
    const move = (t: TokenRef | null): TokenRef | null => (t ? { start: t.start + piece.start, end: t.end + piece.start, image: t.image, line: t.line + piece.line - 1 } : null);
    const found = e.token ? move(e.token) : follow;
    if (latticeEntryError(e.raw, foundText(found))) return null;
    return diag("spw-syntax", missingSpan(found, move(e.previous), this.text.length), syntaxMessage(e.raw, foundText(found), e.rule));
  }

  private modelBlock(b: BlockLayout, syntax: Diagnostic[]): ModelBlock {
    for (const d of b.diagnostics) syntax.push(d);
    // One structural error a block: a broken header usually means a broken brace too.
    if (b.closeError && b.diagnostics.length === 0) {
      const span = missingSpan(b.closeError.found, b.closeError.previous, this.text.length);
      // One error a place: a statement left unfinished at the end of the file has said it.
      if (b.closeError.found || !syntax.some((d) => d.span.start === span.start && d.span.end === span.end))
        syntax.push(diag("spw-syntax", span, `Expected '}' here, found ${foundText(b.closeError.found)}. Close the model block with '}'.`));
    }
    const statements: Statement[] = [];
    for (const piece of b.pieces) for (const st of (piece.result as PieceResult).statements) statements.push(st);
    const name: NameRef = b.name
      ? { name: b.nameQuoted ? b.name.image.slice(1, -1) : b.name.image, span: { start: b.name.start, end: b.name.end } }
      : { name: "", span: { start: b.model.start, end: b.model.end } };
    return {
      kind: "model",
      span: { start: b.model.start, end: b.end },
      keywordSpan: { start: b.model.start, end: b.model.end },
      name,
      statements,
      ...(b.brace ? { openSpan: { start: b.brace.start, end: b.brace.end } } : {}),
      ...(b.close ? { closeSpan: { start: b.close.start, end: b.close.end } } : {}),
    };
  }

  /** One diagnostic per run of stray tokens on a line outside every block (the first 20 runs). */
  private topLevelStrays(): Diagnostic[] {
    const text = this.text;
    const runs: Span[] = [];
    for (const piece of this.pieces) {
      if (piece.kind !== "top") continue;
      // Top pieces are scanned in file positions.
      for (const t of (piece.scan as ScanResult).tokens) {
        const span = { start: t.startOffset, end: t.endOffset + 1 };
        const last = runs[runs.length - 1];
        if (last && !/[\r\n]/.test(text.slice(last.end, span.start))) runs[runs.length - 1] = { start: last.start, end: span.end };
        else runs.push(span);
      }
    }
    return runs
      .slice(0, 20)
      .map((span) =>
        diag("spw-syntax", span, `Unexpected '${text.slice(span.start, span.end)}' outside the model block: every statement goes inside model "name" { ... }.`),
      );
  }

  // ---- tokens, built on demand ----------------------------------------------------------------

  /** A piece's tokens and comments with offsets and lines in the file. */
  private placedTokens(piece: Piece): { readonly tokens: readonly IToken[]; readonly comments: readonly IToken[] } {
    if (!piece.scan) piece.scan = scanText(this.text, piece.start, piece.end, 0, piece.line);
    return piece.scan;
  }

  get tokens(): readonly IToken[] {
    if (!this.tokenList) this.collectTokens();
    return this.tokenList as IToken[];
  }

  get comments(): readonly IToken[] {
    if (!this.commentList) this.collectTokens();
    return this.commentList as IToken[];
  }

  private collectTokens(): void {
    const tokens: IToken[] = [];
    const comments: IToken[] = [];
    for (const piece of this.pieces) {
      const placed = this.placedTokens(piece);
      for (const t of placed.tokens) tokens.push(t);
      for (const c of placed.comments) comments.push(c);
    }
    this.tokenList = tokens;
    this.commentList = comments;
  }

  tokenAt(offset: number): IToken | undefined {
    const pieces = this.pieces;
    // The last piece that starts at or before the offset (pieces cover the text in order).
    let lo = 0;
    let hi = pieces.length - 1;
    while (lo < hi) {
      const mid = (lo + hi + 1) >> 1;
      if ((pieces[mid] as Piece).start <= offset) lo = mid;
      else hi = mid - 1;
    }
    // The last token that starts at or before the offset, in this piece or an earlier one.
    let found: IToken | undefined;
    let foundPiece = -1;
    let foundIndex = -1;
    for (let i = lo; i >= 0 && foundPiece < 0; i--) {
      const tokens = this.placedTokens(pieces[i] as Piece).tokens;
      let a = 0;
      let b = tokens.length - 1;
      while (a <= b) {
        const mid = (a + b) >> 1;
        if ((tokens[mid] as IToken).startOffset > offset) b = mid - 1;
        else {
          foundIndex = mid;
          a = mid + 1;
        }
      }
      if (foundIndex >= 0) {
        found = tokens[foundIndex];
        foundPiece = i;
      }
    }
    if (!found) return undefined;
    const end = (found.endOffset ?? found.startOffset) + 1;
    if (offset < end) return found;
    if (offset > end) return undefined;
    // At a boundary prefer a word over punctuation on the right: `J1|)` hovers J1.
    let next = this.placedTokens(pieces[foundPiece] as Piece).tokens[foundIndex + 1];
    for (let i = foundPiece + 1; !next && i < pieces.length; i++) next = this.placedTokens(pieces[i] as Piece).tokens[0];
    if (next && next.startOffset === offset && /^[A-Za-z_0-9]/.test(next.image) && !/^[A-Za-z_0-9]/.test(found.image)) return next;
    return found;
  }
}

/**
 * A '}' expected inside a custom lattice, found before anything but the next statement or the end:
 * an entry is malformed, and the stray-token report names it, line by line, with what an entry
 * looks like; the parser's own "Expected '}'" would say less, at the same place.
 */
function latticeEntryError(raw: string, found: string): boolean {
  if (!/Expecting (?:token of type )?--> '\}' <--/.test(raw)) return false;
  const word = /^'(\w+)'$/.exec(found)?.[1];
  return found !== "the end of the file" && !(word !== undefined && (STATEMENT_KEYWORDS as readonly string[]).includes(word));
}

/** What a name is, where the grammar expects one: said in the message instead of "a name". */
const NAME_IN_RULE: Readonly<Record<string, string>> = {
  bondSpec: "a site name (a bond reads Cu -> Cu + (1), or shell 1)",
  siteSelector: "a site name (or all)",
  gStmt: "a site name (g Cu = 2.06)",
  letStmt: "a parameter name (let J1 = 1 meV)",
  exchangeStmt: "an exchange kind (heisenberg, xxz, xyz, dm, matrix)",
  vectorStmt: "a name for the lattice vector (vector a1 = (1, 0, 0))",
  siteStmt: "a site name (site A = (0, 0, 0))",
  expectStmt: "a symmetry (su2, u1 about (x, y, z), or none)",
  conventionStmt: "a convention (antiferro-positive or ferro-positive)",
};

/** Rewrites chevrotain's message into one sentence that says what was expected and found. */
function syntaxMessage(raw: string, found: string, rule: string | null = null): string {
  const expecting = /Expecting (?:token of type )?--> (.*?) <--/.exec(raw);
  if (expecting?.[1] === "a name" && rule && NAME_IN_RULE[rule]) return `Expected ${NAME_IN_RULE[rule]} here, found ${found}.`;
  if (expecting?.[1]) {
    if (expecting[1] === "'='" && found === "'('")
      return "Function definitions are not allowed: a parameter is a value, e.g. let J2 = 0.2 * J1.";
    // Inside a statement piece the only '}' the grammar expects closes a custom lattice: before
    // the next statement it was left open (a malformed entry is reported with the stray tokens).
    const hint = expecting[1] === "'}'" ? " Close the lattice block with '}'." : "";
    return `Expected ${expecting[1]} here, found ${found}.${hint}`;
  }
  const oneOf = /Expecting: (?:one of these possible Token sequences:|expecting at least one iteration which starts with one of these possible Token sequences::)?\s*([\s\S]*?)\s*but found:/.exec(raw);
  if (oneOf?.[1]) {
    const options = [...oneOf[1].matchAll(/\[([^\]]*)\]/g)].map((m) => (m[1] ?? "").replace(/, /g, " "));
    const unique = [...new Set(options)].slice(0, 8);
    if (unique.includes("a number") && unique.includes("a name"))
      return `Expected a value here (a number with its unit, a parameter name, or an expression in parentheses), found ${found}.`;
    // Among alternatives, "a name" is named by what it is in this rule ("'shell' or a site name").
    const noun = rule ? NAME_IN_RULE[rule]?.replace(/ \(.*$/, "") : undefined;
    if (unique.length > 0) return `Expected ${unique.map((u) => (u === "a name" && noun ? noun : u)).join(" or ")} here, found ${found}.`;
  }
  return `${raw.replace(/\s+/g, " ").trim()}`;
}
