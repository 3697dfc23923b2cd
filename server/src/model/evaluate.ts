// Evaluates .spw expressions to values with dimensions: scalars, vectors and matrices whose
// numbers are in canonical units (meV for energy, T for field). Only numbers, units, parameter
// names, the constants pi and muB, + - * / ^ and parentheses are allowed: calls are rejected.
// Model layer.
import { closest } from "../base/words";
import { diag, type Diagnostic } from "../base/diagnostics";
import type { Span } from "../base/text";
import type { Expr } from "../syntax/ast";
import { unitKey, ENERGY_UNIT_NAMES, FIELD_UNIT_NAMES, unitInfo, constantNamed, unitSymbolForWord } from "./units";

/** A value with one dimension for all its components: meV^energy T^field. */
export interface Value {
  /** [] scalar, [n] vector (a 1-tuple is [1]), [n, m] matrix. */
  readonly shape: readonly number[];
  readonly data: readonly number[];
  readonly energy: number;
  readonly field: number;
}

export interface EvalContext {
  /** Resolves a parameter name to its value, or undefined when there is no such parameter. */
  lookup(name: string, span: Span): Value | null | undefined;
  report(d: Diagnostic): void;
  /** Records a reference to a name (for go-to-definition and rename). */
  reference?(name: string, span: Span): void;
}

/** The shape of every scalar (shared: values are never mutated). */
const SCALAR_SHAPE: readonly number[] = [];

export function scalar(value: number, energy = 0, field = 0): Value {
  return { shape: SCALAR_SHAPE, data: [value], energy, field };
}

export function isScalarLike(v: Value): boolean {
  return v.shape.length === 0 || (v.shape.length === 1 && v.shape[0] === 1);
}

export function dimensionName(v: { energy: number; field: number }): string {
  if (v.energy === 0 && v.field === 0) return "dimensionless";
  if (v.energy === 1 && v.field === 0) return "an energy";
  if (v.energy === 0 && v.field === 1) return "a magnetic field";
  if (v.energy === 1 && v.field === -1) return "an energy per field (like muB)";
  const parts: string[] = [];
  if (v.energy !== 0) parts.push(`energy^${v.energy}`);
  if (v.field !== 0) parts.push(`field^${v.field}`);
  return parts.join(" ");
}

export function sameDimension(a: Value, b: Value): boolean {
  return a.energy === b.energy && a.field === b.field;
}

const MAX_MAGNITUDE = 1e100;

function outOfRange(data: readonly number[]): boolean {
  for (const x of data) if (!Number.isFinite(x) || Math.abs(x) > MAX_MAGNITUDE) return true;
  return false;
}

export function evaluate(e: Expr, ctx: EvalContext): Value | null {
  const v = evalInner(e, ctx);
  if (v && outOfRange(v.data)) {
    ctx.report(diag("spw-value-invalid", e.span, "This value is not a finite number (overflow or division by zero); check the expression."));
    return null;
  }
  return v;
}

function evalInner(e: Expr, ctx: EvalContext): Value | null {
  switch (e.kind) {
    case "missing":
      return null;
    case "number": {
      if (!Number.isFinite(e.value)) {
        ctx.report(diag("spw-value-invalid", e.span, `The number ${e.text} is too large to represent; use a smaller unit or a smaller value.`));
        return null;
      }
      if (!e.unit) return scalar(e.value);
      const key = unitKey(e.unit.name, e.unit.power);
      const unit = unitInfo(key);
      if (!unit) {
        ctx.report(
          diag(
            "spw-unit-unknown",
            e.unit.span,
            `Unknown unit '${key}'${unitGuess(key)} Energies take ${ENERGY_UNIT_NAMES.join(", ")}; fields take ${FIELD_UNIT_NAMES.join(", ")}.`,
            { data: { unit: key } },
          ),
        );
        return null;
      }
      return scalar(e.value * unit.toCanonical, unit.dimension === "energy" ? 1 : 0, unit.dimension === "field" ? 1 : 0);
    }
    case "name": {
      const constant = constantNamed(e.name);
      if (constant) return scalar(constant.value, constant.energy, constant.field);
      const found = ctx.lookup(e.name, e.span);
      if (found === undefined) {
        const unit = unitInfo(e.name);
        const hint = unit ? ` A unit follows a number: write 1 ${e.name}.` : " Define it first with `let " + e.name + " = ...`.";
        ctx.report(diag("spw-name-unknown", e.span, `Unknown name '${e.name}'.${hint}`, { data: { name: e.name } }));
        return null;
      }
      ctx.reference?.(e.name, e.span);
      return found;
    }
    case "unary": {
      const v = evalInner(e.operand, ctx);
      if (!v) return null;
      return e.op === "-" ? { ...v, data: v.data.map((x) => -x) } : v;
    }
    case "call": {
      // diag(a, b, c) is how many write a diagonal tensor: say how it is written here.
      const diagonal = e.callee.name === "diag" && e.args.length === 3;
      ctx.report(
        diag(
          "spw-expr-forbidden",
          e.span,
          `Function calls such as '${e.callee.name}(...)' are not allowed in values: write numbers, units, parameter names and + - * / ^ only.` +
            (diagonal ? " A diagonal g-tensor is written as its three entries, e.g. g Cu = (2, 2, 2.2); a diagonal exchange as xyz(Jx, Jy, Jz)." : ""),
          diagonal ? { data: { tuple: true } } : {},
        ),
      );
      return null;
    }
    case "tuple":
    case "list": {
      const items = e.items.map((x) => evalInner(x, ctx));
      if (items.some((x) => x === null)) return null;
      const vs = items as Value[];
      if (vs.length === 0) {
        ctx.report(diag("spw-value-kind", e.span, "An empty list has no value; write its components."));
        return null;
      }
      const first = vs[0] as Value;
      for (const v of vs) {
        if (!sameDimension(v, first)) {
          ctx.report(
            diag(
              "spw-unit-mismatch",
              e.span,
              `All components must have the same dimension; found ${dimensionName(first)} and ${dimensionName(v)}.`,
            ),
          );
          return null;
        }
      }
      if (vs.every((v) => isScalarLike(v))) {
        return { shape: [vs.length], data: vs.map((v) => v.data[0] ?? 0), energy: first.energy, field: first.field };
      }
      const width = first.shape[0] ?? 0;
      if (vs.every((v) => v.shape.length === 1 && v.shape[0] === width)) {
        return { shape: [vs.length, width], data: vs.flatMap((v) => [...v.data]), energy: first.energy, field: first.field };
      }
      ctx.report(diag("spw-value-kind", e.span, "Rows of a matrix must all have the same length: write [[a, b, c], [d, e, f], [g, h, i]]."));
      return null;
    }
    case "binary": {
      const a = evalInner(e.left, ctx);
      const b = evalInner(e.right, ctx);
      if (!a || !b) return null;
      return binary(e.op, a, b, e.span, ctx);
    }
  }
}

function asScalarValue(v: Value): Value {
  if (v.shape.length === 0) return v;
  return isScalarLike(v) ? { shape: SCALAR_SHAPE, data: [v.data[0] ?? 0], energy: v.energy, field: v.field } : v;
}

function binary(op: "+" | "-" | "*" | "/" | "^", a0: Value, b0: Value, span: Span, ctx: EvalContext): Value | null {
  const a = asScalarValue(a0);
  const b = asScalarValue(b0);
  if (op === "+" || op === "-") {
    if (!sameDimension(a, b)) {
      ctx.report(
        diag(
          "spw-unit-mismatch",
          span,
          `Cannot ${op === "+" ? "add" : "subtract"} ${dimensionName(b)} ${op === "+" ? "to" : "from"} ${dimensionName(a)}.${conversionHint(a, b)}`,
        ),
      );
      return null;
    }
    if (a.shape.join() !== b.shape.join()) {
      ctx.report(diag("spw-value-kind", span, "Cannot add values of different shapes (scalar, vector, matrix)."));
      return null;
    }
    const s = op === "+" ? 1 : -1;
    return { ...a, data: a.data.map((x, i) => x + s * (b.data[i] ?? 0)) };
  }
  if (op === "^") {
    if (a.shape.length !== 0 || b.shape.length !== 0) {
      ctx.report(diag("spw-value-kind", span, "Powers are defined for scalars only."));
      return null;
    }
    if (b.energy !== 0 || b.field !== 0) {
      ctx.report(diag("spw-unit-mismatch", span, "An exponent must be dimensionless."));
      return null;
    }
    const p = b.data[0] ?? 0;
    if ((a.energy !== 0 || a.field !== 0) && !Number.isInteger(p)) {
      ctx.report(diag("spw-unit-mismatch", span, "A quantity with a unit can only be raised to a whole power."));
      return null;
    }
    return scalar((a.data[0] ?? 0) ** p, a.energy * p, a.field * p);
  }
  // * and /: scalars scale anything; only a scalar may divide.
  const sign = op === "*" ? 1 : -1;
  const energy = a.energy + sign * b.energy;
  const field = a.field + sign * b.field;
  if (b.shape.length === 0) {
    const s = b.data[0] ?? 0;
    if (op === "/" && s === 0) {
      ctx.report(diag("spw-value-invalid", span, "Division by zero."));
      return null;
    }
    if (a.shape.length === 0) return scalar(op === "*" ? (a.data[0] ?? 0) * s : (a.data[0] ?? 0) / s, energy, field);
    return { shape: a.shape, data: a.data.map((x) => (op === "*" ? x * s : x / s)), energy, field };
  }
  if (a.shape.length === 0 && op === "*") {
    const s = a.data[0] ?? 0;
    return { shape: b.shape, data: b.data.map((x) => x * s), energy, field };
  }
  ctx.report(diag("spw-value-kind", span, "Vectors and matrices can be multiplied or divided by scalars only."));
  return null;
}

function conversionHint(a: Value, b: Value): string {
  const dims = new Set([dimensionName(a), dimensionName(b)]);
  if (dims.has("an energy") && dims.has("a magnetic field"))
    return " To turn a field B into an energy use g muB B (e.g. 2 * muB * 1 T); to turn an energy E into a field use E / (g muB).";
  return "";
}

/** "; did you mean meV?" for a unit spelled another way (closest ignores letter case, so "mev" is at distance 0), else ".". */
function unitGuess(key: string): string {
  const guess = unitSymbolForWord(key) ?? closest(key, [...ENERGY_UNIT_NAMES, ...FIELD_UNIT_NAMES])[0];
  return guess ? `; did you mean ${guess}?` : ".";
}
