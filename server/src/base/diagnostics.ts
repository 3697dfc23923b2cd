// The diagnostic catalogue: stable codes (public API shared by the CLI, the server, code actions
// and docs/diagnostics.md), default severities and the diagnostic record. Base layer.
import type { Span } from "./text";

export type Severity = "error" | "warning" | "information" | "hint";

export interface RelatedInfo {
  readonly span: Span;
  readonly message: string;
}

export interface Diagnostic {
  readonly code: DiagnosticCode;
  readonly severity: Severity;
  readonly message: string;
  readonly span: Span;
  readonly related?: readonly RelatedInfo[];
  /** "unnecessary" marks a term that has no effect (rendered faded by editors). */
  readonly tags?: readonly "unnecessary"[];
  /**
   * Machine-readable data for quick fixes (e.g. the replacement text). Never an offset into the
   * file: data must read the same after an edit elsewhere (lengths relative to `span` instead).
   */
  readonly data?: Readonly<Record<string, unknown>>;
}

/** Every code with its default severity and a one-line summary (docs/diagnostics.md lists them). */
export const DIAGNOSTIC_CODES = {
  "spw-syntax": ["error", "The text does not follow the .spw grammar."],
  "spw-character": ["error", "A character that no .spw token starts with."],
  "spw-model-missing": ["error", "The file holds no `model \"name\" { ... }` block."],
  "spw-statement-duplicate": ["error", "A statement that may appear once appears again."],
  "spw-name-unknown": ["error", "A name that no `let`, site or lattice vector defines."],
  "spw-name-duplicate": ["error", "A name defined twice."],
  "spw-name-is-unit": ["error", "A parameter named like a unit (K, T, meV, ...), which would be ambiguous."],
  "spw-param-cycle": ["error", "Parameters defined in terms of each other."],
  "spw-expr-forbidden": ["error", "An expression uses something parameters may not use (function calls, assignments)."],
  "spw-value-invalid": ["error", "A value that is not a finite number (NaN, Infinity, overflow, division by zero)."],
  "spw-value-kind": ["error", "A scalar where a vector or matrix is expected, or the other way round."],
  "spw-unit-mismatch": ["error", "A quantity of the wrong dimension (energy, magnetic field, dimensionless)."],
  "spw-unit-missing": ["error", "A coupling or field given without a unit."],
  "spw-unit-unknown": ["error", "A unit Spinwright does not know."],
  "spw-convention-missing": ["warning", "No sign convention: the default antiferro-positive is assumed."],
  "spw-convention-unknown": ["error", "A sign convention other than antiferro-positive or ferro-positive."],
  "spw-spin-invalid": ["error", "A spin length that is not a positive half-integer."],
  "spw-lattice-missing": ["error", "No lattice statement."],
  "spw-lattice-unknown": ["error", "A lattice preset Spinwright does not know."],
  "spw-lattice-invalid": ["error", "A custom lattice with a name before its braces, without sites, or with degenerate vectors."],
  "spw-site-unknown": ["error", "A bond or term names a site the lattice does not have."],
  "spw-offset-dimension": ["error", "A cell offset with a number of components other than the lattice dimension."],
  "spw-offset-noninteger": ["error", "A cell offset that is not a whole number of cells."],
  "spw-bond-self": ["error", "A bond from a site to itself in the same cell."],
  "spw-bond-duplicate": ["warning", "The same bond given twice for the same exchange kind (double counting; a dm term written from the other end enters with the opposite sign)."],
  "spw-shell-empty": ["error", "A neighbour shell the lattice does not have within the search range."],
  "spw-kind-unknown": ["error", "An exchange kind other than heisenberg, xxz, xyz, dm, matrix."],
  "spw-kind-arguments": ["error", "An exchange kind with the wrong number or kind of arguments."],
  "spw-term-zero": ["hint", "An exchange term whose matrix is zero (no effect)."],
  "spw-single-ion-constant": ["warning", "A single-ion term on spin 1/2, which is a constant (no effect)."],
  "spw-anisotropy-invalid": ["error", "A single-ion term that is not well formed."],
  "spw-g-asymmetric": ["warning", "A g-tensor that is not symmetric."],
  "spw-g-not-positive": ["warning", "A g-tensor that is not positive definite."],
  "spw-direction-zero": ["error", "A direction vector of zero length."],
  "spw-cluster-invalid": ["error", "A finite cluster that cannot be built (size, boundary)."],
  "spw-sweep-invalid": ["error", "A field sweep that is not well formed."],
  "spw-expect-unknown": ["error", "A symmetry claim other than su2, u1 about (n), none."],
  "spw-expect-mismatch": ["error", "The file's symmetry claim disagrees with the computed symmetry."],
  "spw-expect-weaker": ["hint", "The file claims less symmetry than the model has."],
  "spw-coordination": ["warning", "A neighbour shell whose coordination differs from the preset's usual one."],
  "spw-frustrated": ["information", "A frustrated bond cycle."],
  "spw-resonance-unprotected": ["information", "The q = 0 resonance is not pinned at the Zeeman energy."],
} as const satisfies Record<string, readonly [Severity, string]>;

export type DiagnosticCode = keyof typeof DIAGNOSTIC_CODES;

export function defaultSeverity(code: DiagnosticCode): Severity {
  return DIAGNOSTIC_CODES[code][0];
}

/** Builds a diagnostic with the code's default severity. */
export function diag(
  code: DiagnosticCode,
  span: Span,
  message: string,
  extra: Partial<Pick<Diagnostic, "related" | "tags" | "data" | "severity">> = {},
): Diagnostic {
  return { code, severity: extra.severity ?? defaultSeverity(code), message, span, ...extra };
}

/**
 * Whether two diagnostics say the same thing, wherever they point: code, severity, message, the
 * related messages, tags and data equal.
 */
export function sameDiagnosticText(a: Diagnostic, b: Diagnostic): boolean {
  if (a === b) return true;
  if (a.code !== b.code || a.severity !== b.severity || a.message !== b.message) return false;
  const ra = a.related ?? [];
  const rb = b.related ?? [];
  if (ra.length !== rb.length) return false;
  for (let i = 0; i < ra.length; i++) if ((ra[i] as RelatedInfo).message !== (rb[i] as RelatedInfo).message) return false;
  const ta = a.tags ?? [];
  const tb = b.tags ?? [];
  if (ta.length !== tb.length) return false;
  for (let i = 0; i < ta.length; i++) if (ta[i] !== tb[i]) return false;
  return sameData(a.data, b.data);
}

/** Equality of plain data (numbers, strings, booleans, null, arrays and records of them). */
function sameData(a: unknown, b: unknown): boolean {
  if (a === b) return true;
  if (typeof a !== "object" || typeof b !== "object" || a === null || b === null) return false;
  if (Array.isArray(a) !== Array.isArray(b)) return false;
  const ka = Object.keys(a);
  const kb = Object.keys(b);
  if (ka.length !== kb.length) return false;
  for (let i = 0; i < ka.length; i++) {
    const k = ka[i] as string;
    if (k !== kb[i] || !sameData((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k])) return false;
  }
  return true;
}

/**
 * Whether two diagnostics say the same thing at the same span objects (their own and the related
 * ones). Such diagnostics are interchangeable: a span object is the position the parse keeps
 * current for its tree.
 */
export function sameDiagnostic(a: Diagnostic, b: Diagnostic): boolean {
  if (a === b) return true;
  if (a.span !== b.span || !sameDiagnosticText(a, b)) return false;
  const ra = a.related ?? [];
  const rb = b.related ?? [];
  for (let i = 0; i < ra.length; i++) if ((ra[i] as RelatedInfo).span !== (rb[i] as RelatedInfo).span) return false;
  return true;
}
