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
