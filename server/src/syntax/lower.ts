// Lowers the chevrotain CST to the typed AST (ast.ts). Defensive throughout: nodes recovered
// after syntax errors may lack children, and lowering then drops the piece instead of throwing.
// Syntax layer.
import { closest } from "../base/words";
import type { CstElement, CstNode, IToken } from "chevrotain";
import { diag, type Diagnostic } from "../base/diagnostics";
import type { Span } from "../base/text";
import type { BondSpec, Expr, NameRef, Statement } from "./ast";
import { STATEMENT_KEYWORDS } from "./lexer";

type Children = Record<string, CstElement[] | undefined>;

function isToken(e: CstElement): e is IToken {
  return (e as IToken).image !== undefined;
}

function validToken(t: IToken | undefined): t is IToken {
  return t !== undefined && Number.isFinite(t.startOffset) && !t.isInsertedInRecovery;
}

const NO_ELEMENTS: never[] = [];

/** The real tokens under a child key (recovery-inserted ones dropped); no copy when all are real. */
function tokens(c: Children, name: string): IToken[] {
  const list = c[name] as IToken[] | undefined;
  if (!list) return NO_ELEMENTS;
  for (const t of list) if (!validToken(t)) return list.filter(validToken);
  return list;
}

/** Child nodes under a rule key (chevrotain keeps tokens and nodes under separate keys). */
function nodes(c: Children, name: string): CstNode[] {
  return (c[name] as CstNode[] | undefined) ?? NO_ELEMENTS;
}

function tokenSpan(t: IToken): Span {
  return { start: t.startOffset, end: (t.endOffset ?? t.startOffset) + 1 };
}

/** The span covered by all real tokens below a node, or null if it has none. */
function nodeSpan(n: CstNode): Span | null {
  // Chevrotain tracks node offsets; nodes built during error recovery may lack them.
  const loc = n.location;
  if (loc && Number.isFinite(loc.startOffset) && Number.isFinite(loc.endOffset ?? NaN) && !n.recoveredNode)
    return { start: loc.startOffset, end: (loc.endOffset as number) + 1 };
  let start = Infinity;
  let end = -Infinity;
  const visit = (node: CstNode): void => {
    for (const list of Object.values(node.children)) {
      for (const e of list ?? []) {
        if (isToken(e)) {
          if (!validToken(e)) continue;
          start = Math.min(start, e.startOffset);
          end = Math.max(end, (e.endOffset ?? e.startOffset) + 1);
        } else visit(e);
      }
    }
  };
  visit(n);
  return Number.isFinite(start) ? { start, end } : null;
}

function nameRef(t: IToken | undefined): NameRef | undefined {
  return validToken(t) ? { name: t.image, span: tokenSpan(t) } : undefined;
}

function byOffset<T extends { span: Span } | IToken>(items: T[]): T[] {
  // Callers only read the result: a list of fewer than two is already in order.
  if (items.length < 2) return items;
  const key = (x: T): number => ("span" in x ? x.span.start : x.startOffset);
  return [...items].sort((a, b) => key(a) - key(b));
}

/** The real tokens under several child keys, in source order (no allocation when there are none). */
function tokensInOrder(c: Children, names: readonly string[]): IToken[] {
  let found: IToken[] = NO_ELEMENTS;
  for (const name of names) {
    const list = tokens(c, name);
    if (list.length > 0) found = found.length === 0 ? list : [...found, ...list];
  }
  return byOffset(found);
}

const SIGNS = ["Minus", "Plus"];
const OPERATORS = ["Plus", "Minus", "Star", "Slash", "Caret"];

export function lowerExpr(n: CstNode | undefined): Expr | undefined {
  if (!n) return undefined;
  const c = n.children as Children;
  const span = nodeSpan(n);
  if (!span) return undefined;
  switch (n.name) {
    case "expr":
      return lowerOperatorChain(c, span);
    case "operand": {
      const inner = lowerExpr(nodes(c, "primary")[0]);
      if (!inner) return undefined;
      return applySigns(tokensInOrder(c, SIGNS), inner, span);
    }
    case "primary":
      return lowerPrimary(c, span);
    default:
      return { kind: "missing", span };
  }
}

interface OperandPiece {
  signs: IToken[];
  body: Expr;
  span: Span;
}

function applySigns(signs: readonly IToken[], e: Expr, span: Span): Expr {
  let out = e;
  for (let i = signs.length - 1; i >= 0; i--) {
    const t = signs[i] as IToken;
    out = { kind: "unary", span: { start: t.startOffset, end: out.span.end > span.end ? out.span.end : span.end }, op: t.image as "-" | "+", operand: out };
  }
  return out;
}

/**
 * Builds the tree of `operand (op operand)*` by precedence: ^ binds tightest and to the right, and
 * a sign in front of an operand applies to the whole power (-2^2 = -(2^2)); then * and / to the
 * left; then + and - to the left.
 */
function lowerOperatorChain(c: Children, span: Span): Expr | undefined {
  const operandNodes = nodes(c, "operand");
  const pieces: (OperandPiece | null)[] = operandNodes.map((o) => {
    const oc = o.children as Children;
    const body = lowerExpr(nodes(oc, "primary")[0]);
    const ospan = nodeSpan(o);
    return body && ospan ? { signs: tokensInOrder(oc, SIGNS), body, span: ospan } : null;
  });
  const ops = tokensInOrder(c, OPERATORS).map((t) => t.image);
  const only = pieces[0];
  // One operand, no operator (most expressions): what the general path below gives, directly.
  if (pieces.length === 1 && only && ops.length === 0) return applySigns(only.signs, only.body, { start: only.span.start, end: only.body.span.end });
  if (pieces.length === 0 || pieces.some((p) => p === null) || ops.length !== pieces.length - 1) {
    const first = pieces[0];
    if (pieces.length === 1 && first) return applySigns(first.signs, first.body, span);
    return pieces.length > 0 ? { kind: "missing", span } : undefined;
  }
  const ps = pieces as OperandPiece[];
  // Power chains (right-associative), each with the signs of its first operand outside.
  const terms: Expr[] = [];
  const termOps: string[] = [];
  let i = 0;
  while (i < ps.length) {
    let j = i;
    while (j < ops.length && ops[j] === "^") j++;
    // ps[i..j] joined by ^, right to left; the signs of later operands stay on their operands.
    let acc: Expr = j > i ? applySigns((ps[j] as OperandPiece).signs, (ps[j] as OperandPiece).body, (ps[j] as OperandPiece).span) : (ps[i] as OperandPiece).body;
    for (let k = j - 1; k >= i; k--) {
      const p = ps[k] as OperandPiece;
      const base = k === i ? p.body : applySigns(p.signs, p.body, p.span);
      acc = { kind: "binary", span: { start: base.span.start, end: acc.span.end }, op: "^", left: base, right: acc };
    }
    const head = ps[i] as OperandPiece;
    terms.push(applySigns(head.signs, acc, { start: head.span.start, end: acc.span.end }));
    if (j < ops.length) termOps.push(ops[j] as string);
    i = j + 1;
  }
  const fold = (items: Expr[], opsIn: string[], level: readonly string[]): { items: Expr[]; ops: string[] } => {
    const outItems: Expr[] = [items[0] as Expr];
    const outOps: string[] = [];
    opsIn.forEach((op, k) => {
      const right = items[k + 1] as Expr;
      if (level.includes(op)) {
        const left = outItems.pop() as Expr;
        outItems.push({ kind: "binary", span: { start: left.span.start, end: right.span.end }, op: op as "*", left, right });
      } else {
        outOps.push(op);
        outItems.push(right);
      }
    });
    return { items: outItems, ops: outOps };
  };
  const products = fold(terms, termOps, ["*", "/"]);
  const sums = fold(products.items, products.ops, ["+", "-"]);
  return sums.items[0];
}

function lowerPrimary(c: Children, span: Span): Expr {
  const numbers = tokens(c, "NumberLiteral");
  const identifiers = tokens(c, "Identifier");
  const first = numbers[0];
  if (first) {
    const value = Number(first.image);
    const unitToken = identifiers[0];
    if (unitToken) {
      const powerToken = numbers[1];
      const negative = tokens(c, "Minus").length > 0;
      const power = powerToken ? (negative ? -1 : 1) * Number(powerToken.image) : 1;
      const unitEnd = powerToken ? tokenSpan(powerToken).end : tokenSpan(unitToken).end;
      return {
        kind: "number",
        span,
        value,
        text: first.image,
        unit: { name: unitToken.image, power, span: { start: unitToken.startOffset, end: unitEnd } },
      };
    }
    return { kind: "number", span, value, text: first.image };
  }
  const exprs = nodes(c, "expr")
    .map((x) => lowerExpr(x))
    .filter((x): x is Expr => x !== undefined);
  if (tokens(c, "LBracket").length > 0) return { kind: "list", span, items: exprs };
  const ident = identifiers[0];
  if (ident) {
    if (tokens(c, "LParen").length > 0) {
      const args = nodes(c, "argList").flatMap((a) =>
        nodes(a.children as Children, "expr")
          .map((x) => lowerExpr(x))
          .filter((x): x is Expr => x !== undefined),
      );
      return { kind: "call", span, callee: { name: ident.image, span: tokenSpan(ident) }, args };
    }
    return { kind: "name", span, name: ident.image };
  }
  if (tokens(c, "LParen").length > 0) {
    if (exprs.length === 1 && tokens(c, "Comma").length === 0) {
      const inner = exprs[0] as Expr;
      // A parenthesized scalar keeps its own node so that `(1)` can still serve as an offset.
      return { kind: "tuple", span, items: [inner] };
    }
    return { kind: "tuple", span, items: exprs };
  }
  return { kind: "missing", span };
}

function exprOf(c: Children, index = 0): Expr | undefined {
  return lowerExpr(nodes(c, "expr")[index]);
}

function lowerBondSpec(n: CstNode): BondSpec | undefined {
  const c = n.children as Children;
  const span = nodeSpan(n);
  if (!span) return undefined;
  const shellNumber = tokens(c, "NumberLiteral")[0];
  if (tokens(c, "Kw_shell").length > 0) {
    if (!shellNumber) return undefined;
    return { kind: "shell", span, shell: Number(shellNumber.image), shellSpan: tokenSpan(shellNumber) };
  }
  const [fromTok, toTok] = tokens(c, "Identifier");
  const from = nameRef(fromTok);
  const to = nameRef(toTok);
  if (!from || !to) return undefined;
  const offset = lowerExpr(nodes(c, "primary")[0]);
  return offset ? { kind: "explicit", span, from, to, offset } : { kind: "explicit", span, from, to };
}

function lowerStatement(n: CstNode, text: string): Statement | undefined {
  const c = n.children as Children;
  const span = nodeSpan(n);
  if (!span) return undefined;
  const ident = tokens(c, "Identifier");
  switch (n.name) {
    case "spinStmt": {
      const value = exprOf(c);
      if (!value) return undefined;
      const sel = nodes(c, "siteSelector")[0];
      const site = sel ? selectorRef(sel) : undefined;
      return site ? { kind: "spin", span, site, value } : { kind: "spin", span, value };
    }
    case "conventionStmt": {
      const parts = byOffset([...ident, ...tokens(c, "Minus")]);
      const first = parts[0];
      const last = parts[parts.length - 1];
      if (!first || !last) return undefined;
      const valueSpan = { start: first.startOffset, end: (last.endOffset ?? last.startOffset) + 1 };
      // The words and dashes as written, without what lies between them (a line break would end
      // up inside the name and the message).
      return { kind: "convention", span, value: { name: parts.map((t) => t.image).join(""), span: valueSpan } };
    }
    case "latticeStmt": {
      if (tokens(c, "LBrace").length > 0) {
        const vectors = nodes(c, "vectorStmt").flatMap((v) => {
          const vc = v.children as Children;
          const name = nameRef(tokens(vc, "Identifier")[0]);
          const value = exprOf(vc);
          const vspan = nodeSpan(v);
          return name && value && vspan ? [{ name, value, span: vspan }] : [];
        });
        const sites = nodes(c, "siteStmt").flatMap((s) => {
          const sc = s.children as Children;
          const name = nameRef(tokens(sc, "Identifier")[0]);
          const position = exprOf(sc);
          const spin = exprOf(sc, 1);
          const sspan = nodeSpan(s);
          if (!name || !position || !sspan) return [];
          return [spin ? { name, position, spin, span: sspan } : { name, position, span: sspan }];
        });
        const strayName = nameRef(ident[0]);
        return strayName ? { kind: "latticeCustom", span, strayName, vectors, sites } : { kind: "latticeCustom", span, vectors, sites };
      }
      const preset = nameRef(ident[0]);
      if (!preset) return undefined;
      const siteNames = ident.slice(1).map((t) => nameRef(t) as NameRef);
      return { kind: "latticePreset", span, preset, siteNames };
    }
    case "letStmt": {
      const name = nameRef(ident[0]);
      const value = exprOf(c);
      if (!name) return undefined;
      return { kind: "let", span, name, value: value ?? { kind: "missing", span: { start: span.end, end: span.end } } };
    }
    case "exchangeStmt": {
      const exchangeKind = nameRef(ident[0]);
      if (!exchangeKind) return undefined;
      const argList = nodes(c, "argList")[0];
      const args = argList
        ? nodes(argList.children as Children, "expr")
            .map((x) => lowerExpr(x))
            .filter((x): x is Expr => x !== undefined)
        : [];
      const lp = tokens(c, "LParen")[0];
      const rp = tokens(c, "RParen")[0];
      const argsSpan = {
        start: lp ? lp.startOffset : exchangeKind.span.end,
        end: rp ? rp.startOffset + 1 : (args[args.length - 1]?.span.end ?? exchangeKind.span.end),
      };
      const bonds = nodes(c, "bondSpec")
        .map(lowerBondSpec)
        .filter((b): b is BondSpec => b !== undefined);
      return { kind: "exchange", span, exchangeKind, args, argsSpan, bonds };
    }
    case "anisotropyStmt": {
      const sel = nodes(c, "siteSelector")[0];
      const site = sel ? selectorRef(sel) : undefined;
      if (!site) return undefined;
      const exprNodes = nodes(c, "expr");
      const axisTok = tokens(c, "Kw_axis")[0];
      const clauses: { name: NameRef; value: Expr; span: Span }[] = [];
      let axis: Expr | undefined;
      // Clause names and the `axis` keyword each precede one expression, in source order.
      const heads = byOffset([...ident, ...(axisTok ? [axisTok] : [])]);
      const values = exprNodes.map((x) => lowerExpr(x));
      heads.forEach((head, k) => {
        const value = values[k];
        if (!value) return;
        if (head === axisTok) axis = value;
        else clauses.push({ name: { name: head.image, span: tokenSpan(head) }, value, span: { start: head.startOffset, end: value.span.end } });
      });
      return axis ? { kind: "anisotropy", span, site, clauses, axis } : { kind: "anisotropy", span, site, clauses };
    }
    case "gStmt": {
      const sel = nodes(c, "siteSelector")[0];
      const site = sel ? selectorRef(sel) : undefined;
      const value = exprOf(c);
      if (!site || !value) return undefined;
      return { kind: "g", span, site, value };
    }
    case "fieldStmt": {
      const magnitude = exprOf(c);
      if (!magnitude) return undefined;
      const exprs = nodes(c, "expr");
      const hasAlong = tokens(c, "Kw_along").length > 0;
      let k = 1;
      const direction = hasAlong ? lowerExpr(exprs[k++]) : undefined;
      let sweep: { from: Expr; to: Expr; steps?: Expr; span: Span } | undefined;
      const sweepTok = tokens(c, "Kw_sweep")[0];
      if (sweepTok) {
        const from = lowerExpr(exprs[k++]);
        const to = lowerExpr(exprs[k++]);
        const steps = tokens(c, "Kw_steps").length > 0 ? lowerExpr(exprs[k++]) : undefined;
        if (from && to) {
          const sspan = { start: sweepTok.startOffset, end: (steps ?? to).span.end };
          sweep = steps ? { from, to, steps, span: sspan } : { from, to, span: sspan };
        }
      }
      return {
        kind: "field",
        span,
        magnitude,
        ...(direction ? { direction } : {}),
        ...(sweep ? { sweep } : {}),
      };
    }
    case "clusterStmt": {
      const size = exprOf(c);
      if (!size) return undefined;
      const b = tokens(c, "Kw_periodic")[0] ?? tokens(c, "Kw_open")[0];
      const boundary = nameRef(b);
      return boundary ? { kind: "cluster", span, size, boundary } : { kind: "cluster", span, size };
    }
    case "probeStmt": {
      const value = exprOf(c);
      return value ? { kind: "probe", span, value } : undefined;
    }
    case "expectStmt": {
      const written = nameRef(ident[0]);
      if (!written) return undefined;
      // `U(1)` is one claim as written, name and group index together.
      const number = tokens(c, "NumberLiteral")[0];
      const rp = tokens(c, "RParen")[0];
      const claim = number && rp ? { name: `${written.name}(${number.image})`, span: { start: written.span.start, end: rp.startOffset + 1 } } : written;
      const axis = exprOf(c);
      return axis ? { kind: "expect", span, claim, axis } : { kind: "expect", span, claim };
    }
    case "junk":
      return { kind: "junk", span, text: text.slice(span.start, span.end) };
    default:
      return undefined;
  }
}

function selectorRef(n: CstNode): NameRef | undefined {
  const c = n.children as Children;
  return nameRef(tokens(c, "Identifier")[0] ?? tokens(c, "Kw_all")[0]);
}

const STATEMENT_RULES = [
  "spinStmt",
  "conventionStmt",
  "latticeStmt",
  "letStmt",
  "exchangeStmt",
  "anisotropyStmt",
  "gStmt",
  "fieldStmt",
  "clusterStmt",
  "probeStmt",
  "expectStmt",
  "junk",
];

/**
 * Lowers one statement piece (parser.ts `piece`): its statements and stray tokens in source order,
 * and one diagnostic per run of stray tokens on a line. Spans are offsets into `text`, the piece's
 * own text (parse.ts moves them to their place in the file).
 */
export function lowerPiece(cst: CstNode, text: string): { statements: Statement[]; diagnostics: Diagnostic[] } {
  const diagnostics: Diagnostic[] = [];
  const c = cst.children as Children;
  const lowered: Statement[] = [];
  for (const r of STATEMENT_RULES) {
    for (const n of nodes(c, r)) {
      const s = lowerStatement(n, text);
      if (s) lowered.push(s);
    }
  }
  const statements = byOffset(lowered);
  reportJunk(statements, text, diagnostics);
  return { statements, diagnostics };
}

const STATEMENT_WORDS = STATEMENT_KEYWORDS.join(", ");

/** What the braces of a custom lattice hold, for messages about what they should not. */
const LATTICE_ENTRIES = "A custom lattice holds one entry per line: `vector a1 = (1, 0, 0)` or `site A = (0, 0, 0)` (optionally `spin 1`).";

/** "did you mean 'field'? A statement" when the stray text starts with a misspelt statement keyword (three letters or more), else "a statement". */
function keywordGuess(found: string): string {
  const word = /^[A-Za-z_]\w*/.exec(found)?.[0];
  const guess = word && word.length >= 3 ? closest(word, STATEMENT_KEYWORDS.filter((w) => w.length >= 3))[0] : undefined;
  return guess && guess !== word ? `did you mean '${guess}'? A statement` : "a statement";
}

/**
 * One diagnostic per run of stray tokens on a line, saying what a statement starts with; inside
 * the braces of a custom lattice whose entries did not parse, what an entry looks like (and its
 * '}' closes the lattice, no stray).
 */
function reportJunk(statements: Statement[], text: string, diagnostics: Diagnostic[]): void {
  let run: Span | null = null;
  let runInLattice = false;
  let latticeOpen = false;
  // The statement before the run, when the run goes on its line.
  let before: Statement | null = null;
  let runAfter: Statement | null = null;
  const flush = (): void => {
    if (!run) return;
    const found = text.slice(run.start, run.end);
    const tuple = gTuple(runAfter, found, text);
    diagnostics.push(
      diag(
        "spw-syntax",
        run,
        runInLattice
          ? `Unexpected '${found}' in the custom lattice. ${LATTICE_ENTRIES}`
          : tuple
            ? `Unexpected '${found}': a g-tensor given by its principal values is a tuple, ${tuple}.`
            : `Unexpected '${found}': ${keywordGuess(found)} inside the model block starts with one of ${STATEMENT_WORDS}.`,
      ),
    );
    run = null;
  };
  for (const s of statements) {
    if (s.kind !== "junk") {
      flush();
      latticeOpen = s.kind === "latticeCustom" && text[s.span.end - 1] !== "}";
      before = s;
      continue;
    }
    if (latticeOpen && text.slice(s.span.start, s.span.end) === "}") {
      flush();
      latticeOpen = false;
      continue;
    }
    if (run && runInLattice === latticeOpen && !/[\r\n]/.test(text.slice(run.end, s.span.start))) run = { start: run.start, end: s.span.end };
    else {
      flush();
      // A span of its own: the statement's span moves with the tree (parse.ts), the diagnostic's not.
      run = { start: s.span.start, end: s.span.end };
      runInLattice = latticeOpen;
      runAfter = before && !/[\r\n]/.test(text.slice(before.span.end, s.span.start)) ? before : null;
    }
    before = null;
  }
  flush();
}

/** `g Cu = (2, 2, 2.2)` for `g Cu = 2 2 2.2` (a g statement followed on its line by bare numbers), else null. */
function gTuple(statement: Statement | null, found: string, text: string): string | null {
  if (statement?.kind !== "g" || statement.value.kind !== "number" || !/^[0-9.eE+-]+(\s+[0-9.eE+-]+)*$/.test(found)) return null;
  const values = [text.slice(statement.value.span.start, statement.value.span.end), ...found.split(/\s+/)];
  return values.length === 3 ? `g ${statement.site.name} = (${values.join(", ")})` : null;
}
