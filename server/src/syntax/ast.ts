// The typed abstract syntax tree of a .spw file: discriminated unions on `kind`, every node with
// its source span. Produced by lower.ts from the CST; pieces lost to syntax errors are absent.
// Syntax layer.
import type { Span } from "../base/text";

export interface NameRef {
  readonly name: string;
  readonly span: Span;
}

export type Expr =
  | { readonly kind: "number"; readonly span: Span; readonly value: number; readonly text: string; readonly unit?: UnitRef }
  | { readonly kind: "name"; readonly span: Span; readonly name: string }
  | { readonly kind: "unary"; readonly span: Span; readonly op: "-" | "+"; readonly operand: Expr }
  | { readonly kind: "binary"; readonly span: Span; readonly op: "+" | "-" | "*" | "/" | "^"; readonly left: Expr; readonly right: Expr }
  | { readonly kind: "tuple"; readonly span: Span; readonly items: readonly Expr[] }
  | { readonly kind: "list"; readonly span: Span; readonly items: readonly Expr[] }
  | { readonly kind: "call"; readonly span: Span; readonly callee: NameRef; readonly args: readonly Expr[] }
  | { readonly kind: "missing"; readonly span: Span };

export interface UnitRef {
  readonly name: string;
  readonly power: number;
  readonly span: Span;
}

export type BondSpec =
  | { readonly kind: "shell"; readonly span: Span; readonly shell: number; readonly shellSpan: Span }
  | { readonly kind: "explicit"; readonly span: Span; readonly from: NameRef; readonly to: NameRef; readonly offset?: Expr };

export type Statement =
  | { readonly kind: "spin"; readonly span: Span; readonly site?: NameRef; readonly value: Expr }
  | { readonly kind: "convention"; readonly span: Span; readonly value: NameRef }
  | { readonly kind: "latticePreset"; readonly span: Span; readonly preset: NameRef; readonly siteNames: readonly NameRef[] }
  | {
      readonly kind: "latticeCustom";
      readonly span: Span;
      /** A name written before the '{' (`lattice custom {`), which a custom cell does not take: reported, then ignored. */
      readonly strayName?: NameRef;
      readonly vectors: readonly { readonly name: NameRef; readonly value: Expr; readonly span: Span }[];
      readonly sites: readonly { readonly name: NameRef; readonly position: Expr; readonly spin?: Expr; readonly span: Span }[];
    }
  | { readonly kind: "let"; readonly span: Span; readonly name: NameRef; readonly value: Expr }
  | {
      readonly kind: "exchange";
      readonly span: Span;
      readonly exchangeKind: NameRef;
      readonly args: readonly Expr[];
      readonly argsSpan: Span;
      readonly bonds: readonly BondSpec[];
    }
  | {
      readonly kind: "anisotropy";
      readonly span: Span;
      readonly site: NameRef;
      readonly clauses: readonly { readonly name: NameRef; readonly value: Expr; readonly span: Span }[];
      readonly axis?: Expr;
    }
  | { readonly kind: "g"; readonly span: Span; readonly site: NameRef; readonly value: Expr }
  | {
      readonly kind: "field";
      readonly span: Span;
      readonly magnitude: Expr;
      readonly direction?: Expr;
      readonly sweep?: { readonly from: Expr; readonly to: Expr; readonly steps?: Expr; readonly span: Span };
    }
  | { readonly kind: "cluster"; readonly span: Span; readonly size: Expr; readonly boundary?: NameRef }
  | { readonly kind: "probe"; readonly span: Span; readonly value: Expr }
  | { readonly kind: "expect"; readonly span: Span; readonly claim: NameRef; readonly axis?: Expr }
  | { readonly kind: "junk"; readonly span: Span; readonly text: string };

export interface ModelBlock {
  readonly kind: "model";
  readonly span: Span;
  readonly keywordSpan: Span;
  readonly name: NameRef;
  readonly statements: readonly Statement[];
  /** Span of the opening brace, if present. */
  readonly openSpan?: Span;
  /** Span of the closing brace, if present. */
  readonly closeSpan?: Span;
}

export interface SpwFile {
  readonly models: readonly ModelBlock[];
  readonly span: Span;
}

export type StatementKind = Statement["kind"];

/** Calls `visit` on an expression and every sub-expression. */
export function walkExpr(e: Expr, visit: (e: Expr) => void): void {
  visit(e);
  switch (e.kind) {
    case "unary":
      walkExpr(e.operand, visit);
      break;
    case "binary":
      walkExpr(e.left, visit);
      walkExpr(e.right, visit);
      break;
    case "tuple":
    case "list":
      for (const item of e.items) walkExpr(item, visit);
      break;
    case "call":
      for (const a of e.args) walkExpr(a, visit);
      break;
    default:
      break;
  }
}

/** Every expression that appears directly in a statement, in source order. */
export function statementExprs(s: Statement): Expr[] {
  switch (s.kind) {
    case "spin":
    case "let":
    case "g":
    case "probe":
      return [s.value];
    case "latticeCustom":
      return [...s.vectors.map((v) => v.value), ...s.sites.flatMap((x) => (x.spin ? [x.position, x.spin] : [x.position]))];
    case "exchange":
      return [...s.args, ...s.bonds.flatMap((b) => (b.kind === "explicit" && b.offset ? [b.offset] : []))];
    case "anisotropy":
      return [...s.clauses.map((c) => c.value), ...(s.axis ? [s.axis] : [])];
    case "field":
      return [
        s.magnitude,
        ...(s.direction ? [s.direction] : []),
        ...(s.sweep ? [s.sweep.from, s.sweep.to, ...(s.sweep.steps ? [s.sweep.steps] : [])] : []),
      ];
    case "cluster":
      return [s.size];
    case "expect":
      return s.axis ? [s.axis] : [];
    default:
      return [];
  }
}

// ---- moving trees --------------------------------------------------------------------------
// A statement piece is parsed once with offsets relative to its own start; parse.ts then moves its
// tree to wherever the piece sits in each version of the file. `copyStatement` copies a tree
// (every span moved by `delta`); `forEachSpan` reaches every span object of a tree, which lets
// parse.ts move a tree in place. No span object is shared between two nodes (lower.ts makes a
// new one for each), so every span is reached once.

export function shiftSpan(s: Span, delta: number): Span {
  return { start: s.start + delta, end: s.end + delta };
}

/** Calls `visit` once on every span object of an expression tree. */
export function forEachExprSpan(e: Expr, visit: (s: Span) => void): void {
  visit(e.span);
  switch (e.kind) {
    case "number":
      if (e.unit) visit(e.unit.span);
      break;
    case "unary":
      forEachExprSpan(e.operand, visit);
      break;
    case "binary":
      forEachExprSpan(e.left, visit);
      forEachExprSpan(e.right, visit);
      break;
    case "tuple":
    case "list":
      for (const item of e.items) forEachExprSpan(item, visit);
      break;
    case "call":
      visit(e.callee.span);
      for (const a of e.args) forEachExprSpan(a, visit);
      break;
    default:
      break;
  }
}

/** Calls `visit` once on every span object of a statement's tree. */
export function forEachSpan(s: Statement, visit: (span: Span) => void): void {
  visit(s.span);
  switch (s.kind) {
    case "spin":
      if (s.site) visit(s.site.span);
      forEachExprSpan(s.value, visit);
      break;
    case "convention":
      visit(s.value.span);
      break;
    case "latticePreset":
      visit(s.preset.span);
      for (const n of s.siteNames) visit(n.span);
      break;
    case "latticeCustom":
      if (s.strayName) visit(s.strayName.span);
      for (const v of s.vectors) {
        visit(v.span);
        visit(v.name.span);
        forEachExprSpan(v.value, visit);
      }
      for (const site of s.sites) {
        visit(site.span);
        visit(site.name.span);
        forEachExprSpan(site.position, visit);
        if (site.spin) forEachExprSpan(site.spin, visit);
      }
      break;
    case "let":
      visit(s.name.span);
      forEachExprSpan(s.value, visit);
      break;
    case "exchange":
      visit(s.exchangeKind.span);
      visit(s.argsSpan);
      for (const a of s.args) forEachExprSpan(a, visit);
      for (const b of s.bonds) {
        visit(b.span);
        if (b.kind === "shell") visit(b.shellSpan);
        else {
          visit(b.from.span);
          visit(b.to.span);
          if (b.offset) forEachExprSpan(b.offset, visit);
        }
      }
      break;
    case "anisotropy":
      visit(s.site.span);
      for (const c of s.clauses) {
        visit(c.span);
        visit(c.name.span);
        forEachExprSpan(c.value, visit);
      }
      if (s.axis) forEachExprSpan(s.axis, visit);
      break;
    case "g":
      visit(s.site.span);
      forEachExprSpan(s.value, visit);
      break;
    case "field":
      forEachExprSpan(s.magnitude, visit);
      if (s.direction) forEachExprSpan(s.direction, visit);
      if (s.sweep) {
        visit(s.sweep.span);
        forEachExprSpan(s.sweep.from, visit);
        forEachExprSpan(s.sweep.to, visit);
        if (s.sweep.steps) forEachExprSpan(s.sweep.steps, visit);
      }
      break;
    case "cluster":
      forEachExprSpan(s.size, visit);
      if (s.boundary) visit(s.boundary.span);
      break;
    case "probe":
      forEachExprSpan(s.value, visit);
      break;
    case "expect":
      visit(s.claim.span);
      if (s.axis) forEachExprSpan(s.axis, visit);
      break;
    case "junk":
      break;
  }
}

function copyName(n: NameRef, delta: number): NameRef {
  return { name: n.name, span: shiftSpan(n.span, delta) };
}

function copyExpr(e: Expr, delta: number): Expr {
  const span = shiftSpan(e.span, delta);
  switch (e.kind) {
    case "number":
      return e.unit
        ? { kind: "number", span, value: e.value, text: e.text, unit: { name: e.unit.name, power: e.unit.power, span: shiftSpan(e.unit.span, delta) } }
        : { kind: "number", span, value: e.value, text: e.text };
    case "name":
      return { kind: "name", span, name: e.name };
    case "unary":
      return { kind: "unary", span, op: e.op, operand: copyExpr(e.operand, delta) };
    case "binary":
      return { kind: "binary", span, op: e.op, left: copyExpr(e.left, delta), right: copyExpr(e.right, delta) };
    case "tuple":
      return { kind: "tuple", span, items: e.items.map((x) => copyExpr(x, delta)) };
    case "list":
      return { kind: "list", span, items: e.items.map((x) => copyExpr(x, delta)) };
    case "call":
      return { kind: "call", span, callee: copyName(e.callee, delta), args: e.args.map((x) => copyExpr(x, delta)) };
    case "missing":
      return { kind: "missing", span };
  }
}

function copyBond(b: BondSpec, delta: number): BondSpec {
  const span = shiftSpan(b.span, delta);
  if (b.kind === "shell") return { kind: "shell", span, shell: b.shell, shellSpan: shiftSpan(b.shellSpan, delta) };
  const from = copyName(b.from, delta);
  const to = copyName(b.to, delta);
  return b.offset ? { kind: "explicit", span, from, to, offset: copyExpr(b.offset, delta) } : { kind: "explicit", span, from, to };
}

/** A copy of a statement's tree with every span moved by `delta`. */
export function copyStatement(s: Statement, delta: number): Statement {
  const span = shiftSpan(s.span, delta);
  const x = (e: Expr): Expr => copyExpr(e, delta);
  switch (s.kind) {
    case "spin":
      return s.site ? { kind: "spin", span, site: copyName(s.site, delta), value: x(s.value) } : { kind: "spin", span, value: x(s.value) };
    case "convention":
      return { kind: "convention", span, value: copyName(s.value, delta) };
    case "latticePreset":
      return { kind: "latticePreset", span, preset: copyName(s.preset, delta), siteNames: s.siteNames.map((n) => copyName(n, delta)) };
    case "latticeCustom":
      return {
        kind: "latticeCustom",
        span,
        ...(s.strayName ? { strayName: copyName(s.strayName, delta) } : {}),
        vectors: s.vectors.map((v) => ({ name: copyName(v.name, delta), value: x(v.value), span: shiftSpan(v.span, delta) })),
        sites: s.sites.map((site) =>
          site.spin
            ? { name: copyName(site.name, delta), position: x(site.position), spin: x(site.spin), span: shiftSpan(site.span, delta) }
            : { name: copyName(site.name, delta), position: x(site.position), span: shiftSpan(site.span, delta) },
        ),
      };
    case "let":
      return { kind: "let", span, name: copyName(s.name, delta), value: x(s.value) };
    case "exchange":
      return {
        kind: "exchange",
        span,
        exchangeKind: copyName(s.exchangeKind, delta),
        args: s.args.map(x),
        argsSpan: shiftSpan(s.argsSpan, delta),
        bonds: s.bonds.map((b) => copyBond(b, delta)),
      };
    case "anisotropy": {
      const clauses = s.clauses.map((c) => ({ name: copyName(c.name, delta), value: x(c.value), span: shiftSpan(c.span, delta) }));
      return s.axis
        ? { kind: "anisotropy", span, site: copyName(s.site, delta), clauses, axis: x(s.axis) }
        : { kind: "anisotropy", span, site: copyName(s.site, delta), clauses };
    }
    case "g":
      return { kind: "g", span, site: copyName(s.site, delta), value: x(s.value) };
    case "field": {
      const sweep = s.sweep
        ? s.sweep.steps
          ? { from: x(s.sweep.from), to: x(s.sweep.to), steps: x(s.sweep.steps), span: shiftSpan(s.sweep.span, delta) }
          : { from: x(s.sweep.from), to: x(s.sweep.to), span: shiftSpan(s.sweep.span, delta) }
        : undefined;
      return {
        kind: "field",
        span,
        magnitude: x(s.magnitude),
        ...(s.direction ? { direction: x(s.direction) } : {}),
        ...(sweep ? { sweep } : {}),
      };
    }
    case "cluster":
      return s.boundary ? { kind: "cluster", span, size: x(s.size), boundary: copyName(s.boundary, delta) } : { kind: "cluster", span, size: x(s.size) };
    case "probe":
      return { kind: "probe", span, value: x(s.value) };
    case "expect":
      return s.axis ? { kind: "expect", span, claim: copyName(s.claim, delta), axis: x(s.axis) } : { kind: "expect", span, claim: copyName(s.claim, delta) };
    case "junk":
      return { kind: "junk", span, text: s.text };
  }
}
