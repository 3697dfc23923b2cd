// Builds the semantic model from the AST: resolves parameters (with cycle detection), evaluates
// values with units, constructs the lattice, expands bonds, and reports every problem with a
// stable code, a range and a suggested fix. Never throws. Model layer.
import { closest, nearest } from "../base/words";
import { diag, type Diagnostic } from "../base/diagnostics";
import type { Span } from "../base/text";
import {
  IDENTITY3,
  addMat3,
  crossMatrix3,
  diag3,
  mat3,
  normalize3,
  outer3,
  scale3,
  scaleMat3,
  sub3,
  symmetricEigenvalues3,
  transpose3,
  dot3,
  normMat3,
  subMat3,
  ZERO3,
} from "../physics/linalg3";
import { decomposeExchange, type ExchangeDecomposition } from "../physics/symmetry";
import type { Mat3, Vec3 } from "../physics/types";
import type { Expr, ModelBlock, NameRef, Statement, SpwFile } from "../syntax/ast";
import { evaluate, dimensionName, isScalarLike, type EvalContext, type Value } from "./evaluate";
import { bondKey, bondVector, canonicalBond, neighbourShells, PRESETS } from "./lattice";
import {
  EXCHANGE_KINDS,
  type Bond,
  type ClusterSpec,
  type ExchangeKind,
  type ExchangeTerm,
  type ExpectSpec,
  type FieldSpec,
  type Lattice,
  type Parameter,
  type ProbeSpec,
  type SingleIonTerm,
  type Site,
  type SpinModel,
  type SymbolOccurrence,
} from "./model";
import { UNIT_WORDS, ENERGY_UNIT_NAMES, constantNamed } from "./units";
import { isKeyword } from "../syntax/lexer";

export interface BuildResult {
  readonly model: SpinModel | null;
  readonly diagnostics: Diagnostic[];
}

const DEFAULT_G = 2;

/** A diagnostic with its spans copied and moved by `delta` (never sharing a span object). */
function copyDiagnostic(d: Diagnostic, delta: number): Diagnostic {
  const span = { start: d.span.start + delta, end: d.span.end + delta };
  return d.related
    ? { ...d, span, related: d.related.map((r) => ({ span: { start: r.span.start + delta, end: r.span.end + delta }, message: r.message })) }
    : { ...d, span };
}

type LetStatement = Extract<Statement, { kind: "let" }>;
type LatticeStatement = Extract<Statement, { kind: "latticePreset" | "latticeCustom" }>;

/** What evaluating one parameter did, in order: names it read, references, diagnostics. */
type EvalEvent =
  | { readonly kind: "lookup"; readonly name: string; readonly value: Value | null | undefined }
  | { readonly kind: "symbol"; readonly occurrence: SymbolOccurrence }
  | { readonly kind: "diagnostic"; readonly diagnostic: Diagnostic; readonly statementStart: number };

interface ParamEvaluation {
  readonly parameter: Parameter;
  readonly events: readonly EvalEvent[];
}

/**
 * Parameter evaluations kept from one build to the next, keyed by the `let` statement's tree
 * (an incremental parse hands over the same tree when the statement is unchanged, its spans
 * moved). A kept evaluation is replayed only when every parameter it read has been evaluated in
 * this build already, to the very same value; otherwise the parameter is evaluated afresh. A test
 * holds builds with a memo to fresh builds over random edit chains.
 */
export class BuildMemo {
  readonly parameters = new WeakMap<LetStatement, ParamEvaluation>();
  /** The definition occurrence of each `let` statement's name (it points at the tree's span). */
  readonly definitions = new WeakMap<LetStatement, SymbolOccurrence>();
  /** The parameters of the last build as a whole, for a build that changes only a few of them. */
  parameterPhase: ParameterPhase | null = null;
  /** Exchange statements that built without a diagnostic, and what they built (see ExchangeEvaluation). */
  readonly exchanges = new WeakMap<ExchangeStatement, ExchangeEvaluation>();
  /** The lattice of the last build: kept exchange evaluations hold only while bonds read the same lattice. */
  lattice: Lattice | null = null;
  /**
   * How the last lattice was built, when that reported nothing: from which statements (the
   * lattice, spin and g statements, in order), what they read, the site references pushed.
   */
  latticeBuild: { readonly sources: readonly Statement[]; readonly events: readonly EvalEvent[]; readonly symbols: readonly SymbolOccurrence[]; readonly lattice: Lattice } | null = null;
  /** Field, cluster, probe and expect statements that built without a diagnostic (see SingleEvaluation). */
  readonly singles = new WeakMap<Statement, SingleEvaluation>();
}

/**
 * What building a field, cluster, probe or expect statement made, when it reported nothing: the
 * parameter values it read, the references it pushed, and the result (handed out again, the same
 * object, while the statement is the same tree and every value it read is the same). A cluster
 * also reads the lattice's dimension.
 */
interface SingleEvaluation {
  readonly events: readonly EvalEvent[];
  readonly symbols: readonly SymbolOccurrence[];
  readonly value: unknown;
  readonly dimension: number | null;
}

type ExchangeStatement = Extract<Statement, { kind: "exchange" }>;

/**
 * Everything the parameters of one build came to, kept so that the next build can take it over
 * and evaluate only the parameters an edit can reach: those whose statement changed, those in a
 * dependency cycle, and, transitively, every parameter whose evaluation read one of them. Kept
 * only when the `let` names raised no diagnostic (no duplicates, units or constants). The build
 * that takes it over changes its tables in place: like the parse, the build before is consumed.
 */
interface ParameterPhase {
  /** The `let` statements in source order. */
  readonly lets: readonly LetStatement[];
  readonly paramStatements: ReadonlyMap<string, LetStatement>;
  readonly params: ReadonlyMap<string, Parameter>;
  /** For each name, the parameters whose evaluation read it. */
  readonly dependents: ReadonlyMap<string, ReadonlySet<string>>;
  /** The definition occurrences, in the order of `lets`. */
  readonly definitions: readonly SymbolOccurrence[];
  /** The references pushed by each parameter's evaluation (empty lists left out). */
  readonly references: ReadonlyMap<string, readonly SymbolOccurrence[]>;
  /** Parameters whose evaluation reported diagnostics (re-emitted, moved, while they stand). */
  readonly noisy: ReadonlySet<string>;
  /**
   * Parameters on or leading into a dependency cycle: always evaluated again, since the cycle's
   * diagnostic is reported outside any kept evaluation.
   */
  readonly cyclic: ReadonlySet<string>;
}

/** A take-over of the last build's parameters (see ParameterPhase). */
interface FastParameters {
  readonly previous: ParameterPhase;
  /** The parameters to evaluate again; every other one stands as it was. */
  readonly affected: ReadonlySet<string>;
  /** The names each affected parameter read in the build before. */
  readonly readsBefore: ReadonlyMap<string, readonly string[]>;
}

function readsOf(e: ParamEvaluation | undefined): string[] {
  const out: string[] = [];
  for (const ev of e?.events ?? []) if (ev.kind === "lookup") out.push(ev.name);
  return out;
}

/** The Cartesian axes by name, as the vectors a direction is written with. */
const AXIS_VECTORS: Readonly<Record<string, string>> = { x: "(1, 0, 0)", y: "(0, 1, 0)", z: "(0, 0, 1)" };

/** Edited `let` statements beyond which a build evaluates every parameter again. */
const MAX_CHANGED_LETS = 16;

/**
 * One bond as an exchange statement asks for it, before the duplicate check: sites, cell offset,
 * the bond specification's span (in the tree, so it moves with it) and its shell. `key` and
 * `bond` are filled on first use; both depend only on this request and the lattice.
 */
interface BondRequest {
  readonly from: number;
  readonly to: number;
  readonly offset: readonly number[];
  readonly span: Span;
  readonly shell: number | null;
  key?: string;
  bond?: Bond;
}

/**
 * What building one exchange statement did, when it reported nothing: the parameter values it
 * read, the symbols it pushed, its matrix and the bonds it asked for. Replayed when the statement
 * is the same tree, the lattice reads the same to bonds, and every value read is the same.
 */
interface ExchangeEvaluation {
  /**
   * The lattice of the build that last made or replayed this evaluation: it holds only in the next
   * build, and only when that build's lattice reads the same to bonds.
   */
  lattice: Lattice;
  readonly events: readonly EvalEvent[];
  readonly symbols: readonly SymbolOccurrence[];
  readonly written: { readonly matrix: Mat3; readonly scale: number };
  readonly requests: readonly BondRequest[];
  /** The term this evaluation made last, and the convention sign it was made with: handed out again while it reads the same. */
  term: ExchangeTerm;
  sign: 1 | -1;
}

function same3(x: Vec3, y: Vec3): boolean {
  return Object.is(x[0], y[0]) && Object.is(x[1], y[1]) && Object.is(x[2], y[2]);
}

/** The same lattice in every field, with the very same span objects. */
function sameLattice(a: Lattice, b: Lattice): boolean {
  if (a.preset !== b.preset || a.span !== b.span || a.dimension !== b.dimension || a.vectors.length !== b.vectors.length || a.sites.length !== b.sites.length) return false;
  for (let k = 0; k < a.vectors.length; k++) if (!same3(a.vectors[k]!, b.vectors[k]!)) return false;
  for (let k = 0; k < a.sites.length; k++) {
    const x = a.sites[k]!;
    const y = b.sites[k]!;
    if (x.index !== y.index || x.name !== y.name || x.nameSpan !== y.nameSpan || x.gSpan !== y.gSpan || !Object.is(x.spin, y.spin) || !same3(x.position, y.position)) return false;
    for (let i = 0; i < 3; i++) if (!same3(x.g[i]!, y.g[i]!)) return false;
  }
  return true;
}

/** A term's matrix with its decomposition, made together once. */
function withParts(matrixMeV: Mat3): { matrixMeV: Mat3; parts: ExchangeDecomposition } {
  return { matrixMeV, parts: decomposeExchange(matrixMeV) };
}

function sameBonds(a: readonly Bond[], b: readonly Bond[]): boolean {
  if (a.length !== b.length) return false;
  for (let k = 0; k < a.length; k++) if (a[k] !== b[k]) return false;
  return true;
}

/** Equal values: the same numbers (NaN equal to NaN, 0 unequal to -0), shape and units. */
function sameValue(a: Value | null | undefined, b: Value | null | undefined): boolean {
  if (a === b) return true;
  if (!a || !b || a.energy !== b.energy || a.field !== b.field || a.shape.length !== b.shape.length || a.data.length !== b.data.length) return false;
  for (let k = 0; k < a.shape.length; k++) if (a.shape[k] !== b.shape[k]) return false;
  for (let k = 0; k < a.data.length; k++) if (!Object.is(a.data[k], b.data[k])) return false;
  return true;
}

/** Whether bonds read the same from both lattices: dimension, vectors, site names and positions. */
function sameLatticeForBonds(a: Lattice | null, b: Lattice | null): boolean {
  if (!a || !b) return false;
  if (a === b) return true;
  if (a.dimension !== b.dimension || a.vectors.length !== b.vectors.length || a.sites.length !== b.sites.length) return false;
  for (let k = 0; k < a.vectors.length; k++) if (!same3(a.vectors[k]!, b.vectors[k]!)) return false;
  for (let k = 0; k < a.sites.length; k++) {
    const sa = a.sites[k]!;
    const sb = b.sites[k]!;
    if (sa.name !== sb.name || !same3(sa.position, sb.position)) return false;
  }
  return true;
}

export function buildModel(file: SpwFile, text = "", memo: BuildMemo | null = null): BuildResult {
  const diagnostics: Diagnostic[] = [];
  const first = file.models[0];
  if (!first) {
    // Point at the first line with content, or at the start of an empty file.
    const start = Math.max(0, text.search(/\S/));
    const lineEnd = text.slice(start).search(/[\r\n]/);
    const end = lineEnd < 0 ? text.length : start + lineEnd;
    diagnostics.push(
      diag("spw-model-missing", { start, end: Math.max(end, start) }, 'No model block found: a .spw file holds one `model "name" { ... }` block. Start with model "my-model" { and end with }.'),
    );
    return { model: null, diagnostics };
  }
  for (const extra of file.models.slice(1)) {
    diagnostics.push(
      diag("spw-statement-duplicate", extra.keywordSpan, "A .spw file holds one model; move this one into a file of its own."),
    );
  }
  const builder = new ModelBuilder(first, diagnostics, memo);
  return { model: builder.build(), diagnostics };
}

class ModelBuilder {
  private params = new Map<string, Parameter>();
  private paramStatements = new Map<string, Extract<Statement, { kind: "let" }>>();
  /**
   * Parameters taken over from the build before whose values an edit may have changed: present in
   * `params` (so that the list keeps its order) but evaluated again before anything reads them.
   */
  private readonly stale = new Set<string>();
  /** Names of `let` statements refused because they are units (`let K = ...`). */
  private readonly unitNamed = new Set<string>();
  /** Names in a dependency cycle found in this build. */
  private readonly cyclic = new Set<string>();
  /** The definition occurrences pushed by collectParameters, in order. */
  private definitions: SymbolOccurrence[] = [];
  private readonly evaluating = new Set<string>();
  private symbols: SymbolOccurrence[] = [];
  private readonly siteIndex = new Map<string, number>();
  private lattice: Lattice | null = null;
  /**
   * Set once the lattice is missing or could not be built: its own diagnostic says why, so the
   * site names that statements after it use are not reported one by one as unknown.
   */
  private latticeFailed = false;

  /** The events of the parameters being evaluated (innermost last), for the memo. */
  private readonly recording: EvalEvent[][] = [];

  constructor(
    private readonly block: ModelBlock,
    private readonly diagnostics: Diagnostic[],
    private readonly memo: BuildMemo | null = null,
  ) {}

  /** The block's statements by kind, each list in source order: sorted once, as most phases read one kind. */
  private sorted: { readonly byKind: Map<Statement["kind"], Statement[]>; readonly lattices: LatticeStatement[] } | null = null;

  private sortStatements(): { readonly byKind: Map<Statement["kind"], Statement[]>; readonly lattices: LatticeStatement[] } {
    if (this.sorted) return this.sorted;
    const byKind = new Map<Statement["kind"], Statement[]>();
    const lattices: LatticeStatement[] = [];
    for (const s of this.block.statements) {
      const list = byKind.get(s.kind);
      if (list) list.push(s);
      else byKind.set(s.kind, [s]);
      if (s.kind === "latticePreset" || s.kind === "latticeCustom") lattices.push(s);
    }
    this.sorted = { byKind, lattices };
    return this.sorted;
  }

  private statementsOf<K extends Statement["kind"]>(kind: K): readonly Extract<Statement, { kind: K }>[] {
    return (this.sortStatements().byKind.get(kind) ?? []) as Extract<Statement, { kind: K }>[];
  }

  /** `build(s)`, or what it made from the same statement in the build before (see SingleEvaluation). */
  private keptOrBuilt<S extends Statement, T>(s: S, build: (s: S) => T): T {
    const memo = this.memo;
    const dimension = s.kind === "cluster" ? (this.lattice?.dimension ?? null) : null;
    const kept = memo?.singles.get(s);
    if (kept && kept.dimension === dimension && this.canReplay(kept)) {
      for (const occurrence of kept.symbols) this.symbols.push(occurrence);
      return kept.value as T;
    }
    const { value, events, symbols, clean } = this.recorded(() => build(s));
    if (memo && clean) memo.singles.set(s, { events, symbols, value, dimension });
    else memo?.singles.delete(s);
    return value;
  }

  /**
   * Runs `build` recording the parameter values it reads and the references it pushes, for a memo
   * entry; `clean` when it reported no diagnostic (only such builds are kept).
   */
  private recorded<T>(build: () => T): { value: T; events: EvalEvent[]; symbols: SymbolOccurrence[]; clean: boolean } {
    const diagnosticsBefore = this.diagnostics.length;
    const symbolsBefore = this.symbols.length;
    const events: EvalEvent[] = [];
    this.recording.push(events);
    const value = build();
    this.recording.pop();
    return { value, events, symbols: this.symbols.slice(symbolsBefore), clean: this.diagnostics.length === diagnosticsBefore };
  }

  private report(d: Diagnostic): void {
    this.diagnostics.push(d);
  }

  private once<K extends Statement["kind"]>(kind: K, what: string): Extract<Statement, { kind: K }> | null {
    const all = this.statementsOf(kind);
    for (const extra of all.slice(1)) {
      this.report(
        diag("spw-statement-duplicate", extra.span, `A second ${what} statement; a model has one. Remove one of them.`, {
          related: all[0] ? [{ span: all[0].span, message: `the first ${what} statement` }] : [],
        }),
      );
    }
    return all[0] ?? null;
  }

  build(): SpinModel {
    const lets = this.statementsOf("let");
    const diagnosticsBefore = this.diagnostics.length;
    const fast = this.takeOverParameters(lets);
    if (!fast) this.collectParameters();
    const namesClean = this.diagnostics.length === diagnosticsBefore;
    const convention = this.buildConvention();
    const sign: 1 | -1 = convention?.value === "ferro-positive" ? -1 : 1;
    this.lattice = this.latticeKeptOrBuilt();
    this.latticeFailed = this.lattice === null;
    if (fast) this.finishParameters(fast);
    else for (const s of lets) this.parameter(s.name.name);
    if (this.memo) this.memo.parameterPhase = namesClean ? this.parameterPhase(lets, fast) : null;
    const exchanges = this.buildExchanges(sign);
    const singleIon = this.buildSingleIon();
    const field = this.buildField();
    const cluster = this.buildCluster();
    const probe = this.buildProbe();
    const expect = this.buildExpect();
    return {
      name: this.block.name.name,
      nameSpan: this.block.name.span,
      span: this.block.span,
      convention,
      sign,
      lattice: this.lattice,
      parameters: this.params,
      exchanges,
      singleIon,
      field,
      cluster,
      probe,
      expect,
      symbols: this.symbols,
    };
  }

  // ---- parameters -------------------------------------------------------------------------

  private collectParameters(): void {
    for (const s of this.statementsOf("let")) {
      const name = s.name.name;
      if (UNIT_WORDS.has(name)) {
        this.unitNamed.add(name);
        this.report(
          diag("spw-name-is-unit", s.name.span, `'${name}' is a unit; name the parameter differently, e.g. ${name}1 or ${name}_ex.`),
        );
        continue;
      }
      if (constantNamed(name)) {
        this.report(diag("spw-name-duplicate", s.name.span, `'${name}' is a built-in constant; choose another name.`));
        continue;
      }
      const previous = this.paramStatements.get(name);
      if (previous) {
        this.report(
          diag("spw-name-duplicate", s.name.span, `'${name}' is already defined; rename one of the two definitions.`, {
            related: [{ span: previous.name.span, message: `first definition of ${name}` }],
          }),
        );
        continue;
      }
      this.paramStatements.set(name, s);
      // The occurrence only points into the tree: the one made for this statement before serves.
      let definition = this.memo?.definitions.get(s);
      if (!definition || definition.name !== name) {
        definition = { name, kind: "parameter", span: s.name.span, isDefinition: true };
        this.memo?.definitions.set(s, definition);
      }
      this.symbols.push(definition);
      this.definitions.push(definition);
    }
  }

  // ---- taking over the parameters of the build before ---------------------------------------

  /**
   * When the `let` statements carry the same names in the same order as in the last build and
   * only a few of them changed, take over its parameters: definitions, the name table and every
   * parameter no edit can reach. Returns null (and changes nothing) otherwise.
   */
  private takeOverParameters(lets: readonly LetStatement[]): FastParameters | null {
    const previous = this.memo?.parameterPhase;
    if (!previous || previous.lets.length !== lets.length) return null;
    const changed: number[] = [];
    for (let i = 0; i < lets.length; i++) {
      const now = lets[i]!;
      const before = previous.lets[i]!;
      if (now === before) continue;
      if (now.name.name !== before.name.name || changed.length >= MAX_CHANGED_LETS) return null;
      changed.push(i);
    }
    // The parameters an edit can reach: changed statements, cycles, and what read them.
    const affected = new Set<string>(previous.cyclic);
    for (const i of changed) affected.add(lets[i]!.name.name);
    const queue = [...affected];
    while (queue.length > 0) {
      for (const d of previous.dependents.get(queue.pop()!) ?? []) {
        if (!affected.has(d)) {
          affected.add(d);
          queue.push(d);
        }
      }
    }
    const readsBefore = new Map<string, string[]>();
    for (const name of affected) {
      const s = previous.paramStatements.get(name);
      readsBefore.set(name, readsOf(s ? this.memo?.parameters.get(s) : undefined));
    }
    // The build before is consumed (see analyzeDocument): its tables are taken over, not copied.
    this.paramStatements = previous.paramStatements as Map<string, LetStatement>;
    this.definitions = previous.definitions.slice();
    for (const i of changed) {
      const s = lets[i]!;
      const name = s.name.name;
      this.paramStatements.set(name, s);
      const definition: SymbolOccurrence = { name, kind: "parameter", span: s.name.span, isDefinition: true };
      this.memo?.definitions.set(s, definition);
      this.definitions[i] = definition;
    }
    this.symbols = this.definitions.slice();
    this.params = previous.params as Map<string, Parameter>;
    for (const name of affected) this.stale.add(name);
    return { previous, affected, readsBefore };
  }

  /**
   * The parameter step of a take-over: the references and diagnostics of every parameter that
   * stands, then the affected ones evaluated (or replayed) in source order, as a full build would.
   */
  private finishParameters(fast: FastParameters): void {
    const { previous, affected } = fast;
    for (const [name, refs] of previous.references) if (!affected.has(name)) for (const r of refs) this.symbols.push(r);
    for (const name of previous.noisy) {
      if (affected.has(name)) continue;
      const s = this.paramStatements.get(name);
      const kept = s ? this.memo?.parameters.get(s) : undefined;
      if (!s || !kept) continue;
      for (const ev of kept.events) if (ev.kind === "diagnostic") this.report(copyDiagnostic(ev.diagnostic, s.span.start - ev.statementStart));
    }
    for (const s of previous.lets) {
      const name = s.name.name;
      if (affected.has(name)) this.parameter(name);
    }
  }

  /** What this build's parameters came to, for the next build (see ParameterPhase). */
  private parameterPhase(lets: readonly LetStatement[], fast: FastParameters | null): ParameterPhase {
    const memo = this.memo;
    const evaluationOf = (name: string): ParamEvaluation | undefined => {
      const s = this.paramStatements.get(name);
      return s ? memo?.parameters.get(s) : undefined;
    };
    let dependents: Map<string, Set<string>>;
    let references: Map<string, readonly SymbolOccurrence[]>;
    let noisy: Set<string>;
    let redo: Iterable<string>;
    if (fast) {
      // Only the affected parameters can have new reads, references or diagnostics.
      const before = fast.previous;
      dependents = before.dependents as Map<string, Set<string>>;
      references = before.references as Map<string, readonly SymbolOccurrence[]>;
      noisy = before.noisy as Set<string>;
      for (const name of fast.affected) {
        for (const read of fast.readsBefore.get(name) ?? []) dependents.get(read)?.delete(name);
        references.delete(name);
        noisy.delete(name);
      }
      redo = fast.affected;
    } else {
      dependents = new Map();
      references = new Map();
      noisy = new Set();
      redo = this.paramStatements.keys();
    }
    for (const name of redo) {
      const e = evaluationOf(name);
      for (const read of readsOf(e)) {
        let set = dependents.get(read);
        if (!set) dependents.set(read, (set = new Set()));
        set.add(name);
      }
      const refs = e ? e.events.flatMap((ev) => (ev.kind === "symbol" ? [ev.occurrence] : [])) : [];
      if (refs.length > 0) references.set(name, refs);
      if (e?.events.some((ev) => ev.kind === "diagnostic")) noisy.add(name);
    }
    return {
      lets,
      paramStatements: this.paramStatements,
      params: this.params,
      dependents,
      definitions: this.definitions,
      references,
      noisy,
      cyclic: this.cyclic,
    };
  }

  /** How expressions reach parameters, diagnostics and the symbol list (one for the whole build). */
  private readonly evalContext: EvalContext = {
    lookup: (name, span) => {
      if (this.unitNamed.has(name) && !this.paramStatements.has(name)) {
        // `let K = -8 meV` was refused (K is the kelvin): say so where K is used, not "write 1 K".
        this.evalContext.report(
          diag("spw-name-unknown", span, `'${name}' is a unit, so \`let ${name} = ...\` defines no parameter: rename it there and here, e.g. ${name}1.`, {
            data: { name, suggestions: [`${name}1`] },
          }),
        );
        // Recorded as a read of no value, so that a kept evaluation is not replayed once the let is renamed.
        this.recording[this.recording.length - 1]?.push({ kind: "lookup", name, value: null });
        return null;
      }
      const value = this.paramStatements.has(name) ? (this.parameter(name)?.value ?? null) : undefined;
      this.recording[this.recording.length - 1]?.push({ kind: "lookup", name, value });
      return value;
    },
    report: (d) => {
      this.report(d);
      const frame = this.recording[this.recording.length - 1];
      if (frame) {
        // Kept as a copy: a diagnostic's span may be computed, not a span of the tree that moves.
        const statement = this.paramStatements.get(this.evaluatingOrder[this.evaluatingOrder.length - 1] ?? "");
        frame.push({ kind: "diagnostic", diagnostic: copyDiagnostic(d, 0), statementStart: statement?.span.start ?? 0 });
      }
    },
    reference: (name, span) => {
      // The span is the name's own span in the tree, which moves with it.
      const occurrence: SymbolOccurrence = { name, kind: "parameter", span, isDefinition: false };
      this.symbols.push(occurrence);
      this.recording[this.recording.length - 1]?.push({ kind: "symbol", occurrence });
    },
  };

  /** The parameters being evaluated, innermost last. */
  private readonly evaluatingOrder: string[] = [];

  /**
   * A kept evaluation applies when every name it read has the same value in this build already
   * (the same numbers, shape and units: a parameter whose statement was only reformatted is
   * evaluated again, to an equal value, and what reads it need not be).
   */
  private canReplay(e: { readonly events: readonly EvalEvent[] }): boolean {
    for (const ev of e.events) {
      if (ev.kind !== "lookup") continue;
      if (this.paramStatements.has(ev.name)) {
        const p = this.stale.has(ev.name) ? undefined : this.params.get(ev.name);
        if (!p || !sameValue(p.value, ev.value)) return false;
      } else if (ev.value !== undefined) return false;
    }
    return true;
  }

  private replay(e: ParamEvaluation, s: LetStatement): void {
    for (const ev of e.events) {
      if (ev.kind === "symbol") this.symbols.push(ev.occurrence);
      else if (ev.kind === "diagnostic") this.report(copyDiagnostic(ev.diagnostic, s.span.start - ev.statementStart));
    }
  }

  private context(): EvalContext {
    return this.evalContext;
  }

  private parameter(name: string): Parameter | null {
    const done = this.params.get(name);
    if (done && !this.stale.has(name)) return done;
    const s = this.paramStatements.get(name);
    if (!s) return null;
    if (this.evaluating.has(name)) {
      const chain = [...this.evaluating, name];
      // Its diagnostic is not part of any kept evaluation: the next build evaluates these again.
      for (const n of chain) this.cyclic.add(n);
      this.report(
        diag("spw-param-cycle", s.name.span, `'${name}' depends on itself (${chain.join(" -> ")}); give one of them a value of its own.`),
      );
      return null;
    }
    const kept = this.memo?.parameters.get(s);
    if (kept && this.canReplay(kept)) {
      this.replay(kept, s);
      this.stale.delete(name);
      this.params.set(name, kept.parameter);
      return kept.parameter;
    }
    this.evaluating.add(name);
    this.evaluatingOrder.push(name);
    const events: EvalEvent[] = [];
    this.recording.push(events);
    const value = evaluate(s.value, this.context());
    this.recording.pop();
    this.evaluatingOrder.pop();
    this.evaluating.delete(name);
    const p: Parameter = { name, nameSpan: s.name.span, statementSpan: s.span, valueSpan: s.value.span, value };
    this.stale.delete(name);
    this.params.set(name, p);
    this.memo?.parameters.set(s, { parameter: p, events });
    return p;
  }

  private eval(e: Expr): Value | null {
    return evaluate(e, this.context());
  }

  // ---- typed value helpers ----------------------------------------------------------------

  private energy(e: Expr, what: string, allowDimensionless = false): number | null {
    const v = this.eval(e);
    if (!v) return null;
    if (!isScalarLike(v)) {
      this.report(diag("spw-value-kind", e.span, `${what} must be a single number, not a vector or matrix.`));
      return null;
    }
    const x = v.data[0] ?? 0;
    if (v.energy === 1 && v.field === 0) return x;
    if (v.energy === 0 && v.field === 0) {
      if (allowDimensionless) return x;
      this.report(
        diag("spw-unit-missing", e.span, `${what} needs an energy unit: write e.g. ${fmt(x)} K or ${fmt(x)} meV (energies: ${ENERGY_UNIT_NAMES.join(", ")}).`, {
          data: { value: x },
        }),
      );
      return null;
    }
    if (v.energy === 0 && v.field === 1) {
      this.report(
        diag(
          "spw-unit-mismatch",
          e.span,
          `${what} is a magnetic field (${fmt(x)} T), but an energy is needed. For the Zeeman energy of this field multiply by g muB, e.g. 2 * muB * ${fmt(x)} T.`,
        ),
      );
      return null;
    }
    this.report(diag("spw-unit-mismatch", e.span, `${what} is ${dimensionName(v)}; an energy is needed.`));
    return null;
  }

  private dimensionless(e: Expr, what: string): number | null {
    const v = this.eval(e);
    if (!v) return null;
    if (!isScalarLike(v)) {
      this.report(diag("spw-value-kind", e.span, `${what} must be a single number.`));
      return null;
    }
    if (v.energy !== 0 || v.field !== 0) {
      this.report(diag("spw-unit-mismatch", e.span, `${what} must be a pure number, but this is ${dimensionName(v)}.`));
      return null;
    }
    return v.data[0] ?? 0;
  }

  /** A dimensionless 3-vector (directions, positions); null after reporting. */
  private vector3(e: Expr, what: string, requireNonZero: boolean): Vec3 | null {
    // `along z`: an axis named where a direction goes (unless a parameter has that name).
    const axis = requireNonZero && e.kind === "name" && !this.params.has(e.name) ? AXIS_VECTORS[e.name] : undefined;
    if (axis && e.kind === "name") {
      this.report(diag("spw-name-unknown", e.span, `Unknown name '${e.name}'. ${what} is a vector: for the ${e.name} axis write ${axis}.`, { data: { name: e.name, suggestions: [axis] } }));
      return null;
    }
    const v = this.eval(e);
    if (!v) return null;
    if (v.energy !== 0 || v.field !== 0) {
      this.report(diag("spw-unit-mismatch", e.span, `${what} is a direction or position and takes no unit.`));
      return null;
    }
    if (v.shape.length !== 1 || (v.shape[0] ?? 0) < 1 || (v.shape[0] ?? 0) > 3) {
      this.report(diag("spw-value-kind", e.span, `${what} must be a vector such as (0, 0, 1).`));
      return null;
    }
    const r: Vec3 = [v.data[0] ?? 0, v.data[1] ?? 0, v.data[2] ?? 0];
    if (requireNonZero && !normalize3(r)) {
      this.report(diag("spw-direction-zero", e.span, `${what} has zero length; give a direction such as (0, 0, 1).`));
      return null;
    }
    return r;
  }

  // ---- statements -------------------------------------------------------------------------

  private buildConvention(): SpinModel["convention"] {
    const s = this.once("convention", "convention");
    if (!s) {
      this.report(
        diag(
          "spw-convention-missing",
          this.block.name.span,
          "No sign convention given: assuming antiferro-positive (H = +J S_i.S_j, J > 0 antiferromagnetic). Add `convention antiferro-positive` or `convention ferro-positive`.",
          { data: { insert: "convention antiferro-positive" } },
        ),
      );
      return null;
    }
    const v = s.value.name;
    if (v === "antiferro-positive" || v === "ferro-positive") return { value: v, span: s.value.span };
    this.report(
      diag(
        "spw-convention-unknown",
        s.value.span,
        `Unknown convention '${v}': write antiferro-positive (H = +J S_i.S_j) or ferro-positive (H = -J S_i.S_j).`,
        // The usual short names say which sign of J they call positive.
        /^(afm?|antiferro|antiferromagnetic)$/i.test(v)
          ? { data: { suggestions: ["antiferro-positive"] } }
          : /^(fm?|ferro|ferromagnetic)$/i.test(v)
            ? { data: { suggestions: ["ferro-positive"] } }
            : {},
      ),
    );
    return null;
  }

  private spinValue(e: Expr): number | null {
    const x = this.dimensionless(e, "A spin length");
    if (x === null) return null;
    if (!(x > 0) || Math.abs(2 * x - Math.round(2 * x)) > 1e-9) {
      this.report(
        diag("spw-spin-invalid", e.span, `Spin ${fmt(x)} is not a positive half-integer; write 1/2, 1, 3/2, 2, ...`),
      );
      return null;
    }
    return Math.round(2 * x) / 2;
  }

  /**
   * The lattice of the build before when it was built without a diagnostic from the very same
   * lattice, spin and g statements, every value they read being the same; otherwise built now.
   */
  private latticeKeptOrBuilt(): Lattice | null {
    const memo = this.memo;
    const sources: Statement[] = [...this.sortStatements().lattices, ...this.statementsOf("spin"), ...this.statementsOf("g")];
    const kept = memo?.latticeBuild;
    if (kept && kept.sources.length === sources.length && kept.sources.every((x, k) => x === sources[k]) && this.canReplay(kept)) {
      for (const occurrence of kept.symbols) this.symbols.push(occurrence);
      for (const site of kept.lattice.sites) this.siteIndex.set(site.name, site.index);
      return kept.lattice;
    }
    const { value: lattice, events, symbols, clean } = this.recorded(() => this.buildLattice());
    if (memo) memo.latticeBuild = lattice && clean ? { sources, events, symbols, lattice } : null;
    return lattice;
  }

  private buildLattice(): Lattice | null {
    const presetStmt = this.sortStatements().lattices;
    for (const extra of presetStmt.slice(1))
      this.report(diag("spw-statement-duplicate", extra.span, "A second lattice statement; a model has one lattice. Remove one of them."));
    const s = presetStmt[0];
    if (!s) {
      this.report(
        diag("spw-lattice-missing", this.block.name.span, "No lattice given: add e.g. `lattice chain` or a custom `lattice { vector a1 = (1, 0, 0)  site A = (0, 0, 0) }`.", {
          data: { insert: "lattice chain" },
        }),
      );
      return null;
    }
    // Default spin and per-site spins.
    const spinStatements = this.statementsOf("spin");
    const defaults = spinStatements.filter((x) => !x.site || x.site.name === "all");
    for (const extra of defaults.slice(1))
      this.report(diag("spw-statement-duplicate", extra.span, "A second default spin; give per-site spins as `spin Cu = 1`."));
    const defaultSpin = defaults[0] ? (this.spinValue(defaults[0].value) ?? 0.5) : 0.5;

    let vectors: Vec3[] = [];
    let sites: { name: string; nameSpan: Span | null; position: Vec3; spin: number | null }[] = [];
    let preset: string | null = null;
    if (s.kind === "latticePreset") {
      const p = PRESETS[s.preset.name];
      if (!p) {
        const suggestions = closest(s.preset.name, Object.keys(PRESETS));
        this.report(
          diag(
            "spw-lattice-unknown",
            s.preset.span,
            `Unknown lattice '${s.preset.name}'${suggestions[0] ? `; did you mean ${suggestions[0]}?` : "."} Presets: ${Object.keys(PRESETS).join(", ")}; or write a custom lattice { ... } block.`,
            { data: { name: s.preset.name, suggestions } },
          ),
        );
        return null;
      }
      preset = p.name;
      vectors = p.vectors.map((v) => v);
      if (s.siteNames.length > 0 && s.siteNames.length !== p.sites.length) {
        this.report(
          diag(
            "spw-lattice-invalid",
            { start: (s.siteNames[0] as NameRef).span.start, end: (s.siteNames[s.siteNames.length - 1] as NameRef).span.end },
            `The ${p.name} lattice has ${p.sites.length} site(s) per cell (${p.sites.map((x) => x.name).join(", ")}); name exactly that many.`,
          ),
        );
      }
      sites = p.sites.map((site, k) => {
        const named = s.siteNames.length === p.sites.length ? s.siteNames[k] : undefined;
        return { name: named?.name ?? site.name, nameSpan: named?.span ?? null, position: site.position, spin: null };
      });
    } else {
      if (s.strayName) {
        const name = s.strayName.name;
        this.report(
          diag(
            "spw-lattice-invalid",
            s.strayName.span,
            PRESETS[name]
              ? `A custom lattice takes no name: remove '${name}' to define the cell in the braces, or write \`lattice ${name}\` without the braces to use the preset.`
              : `A custom lattice takes no name: write \`lattice {\` and list the cell's vectors and sites inside. Remove '${name}'.`,
            { data: { removeName: true } },
          ),
        );
      }
      for (const v of s.vectors) {
        const r = this.vector3(v.value, `Lattice vector ${v.name.name}`, true);
        this.symbols.push({ name: v.name.name, kind: "vector", span: v.name.span, isDefinition: true });
        if (r) vectors.push(r);
      }
      for (const site of s.sites) {
        const r = this.vector3(site.position, `The position of site ${site.name.name}`, false);
        const spin = site.spin ? this.spinValue(site.spin) : null;
        sites.push({ name: site.name.name, nameSpan: site.name.span, position: r ?? ZERO3, spin });
      }
      if (sites.length === 0) {
        this.report(diag("spw-lattice-invalid", s.span, "A custom lattice needs at least one site: add `site A = (0, 0, 0)`."));
        return null;
      }
      if (vectors.length > 3 || !independent(vectors)) {
        this.report(diag("spw-lattice-invalid", s.span, "The lattice vectors must be 1 to 3 linearly independent vectors."));
        return null;
      }
    }
    // Names must be unique.
    const result: Site[] = [];
    for (const site of sites) {
      if (this.siteIndex.has(site.name)) {
        this.report(diag("spw-name-duplicate", site.nameSpan ?? s.span, `Site '${site.name}' is defined twice; give each site its own name.`));
        continue;
      }
      if (isKeyword(site.name)) continue;
      this.siteIndex.set(site.name, result.length);
      if (site.nameSpan) this.symbols.push({ name: site.name, kind: "site", span: site.nameSpan, isDefinition: true });
      result.push({
        index: result.length,
        name: site.name,
        nameSpan: site.nameSpan,
        position: site.position,
        spin: site.spin ?? defaultSpin,
        g: scaleMat3(IDENTITY3, DEFAULT_G),
        gSpan: null,
      });
    }
    // Per-site spin statements.
    for (const sp of spinStatements) {
      if (!sp.site || sp.site.name === "all") continue;
      const idx = this.site(sp.site);
      const v = this.spinValue(sp.value);
      const target = idx === null ? undefined : result[idx];
      if (target && v !== null) result[idx as number] = { ...target, spin: v };
    }
    const lattice: Lattice = { preset, span: s.span, vectors, sites: result, dimension: vectors.length };
    this.lattice = lattice;
    this.applyG(result);
    // The lattice of the build before when this one reads the same, spans included (the same
    // objects, which the parse moves in place): what is kept by lattice (neighbour shells, the
    // exchange statements' bonds) stays kept, and the physics memo's comparison is one check.
    const before = this.memo?.lattice ?? null;
    return before && sameLattice(before, lattice) ? before : lattice;
  }

  /** Resolves a site name (recording the reference); reports and returns null if unknown. */
  private site(ref: NameRef): number | null {
    const idx = this.siteIndex.get(ref.name);
    if (idx === undefined) {
      if (this.latticeFailed) return null;
      const known = [...this.siteIndex.keys()];
      const suggestion = closest(ref.name, known);
      this.report(
        diag(
          "spw-site-unknown",
          ref.span,
          `Unknown site '${ref.name}'. The lattice has ${known.length ? known.join(", ") : "no sites"}${suggestion.length ? `; did you mean ${nearest(ref.name, known).slice(0, 3).join(" or ")}?` : "."}`,
          { data: { name: ref.name, suggestions: suggestion } },
        ),
      );
      return null;
    }
    this.symbols.push({ name: ref.name, kind: "site", span: ref.span, isDefinition: false });
    return idx;
  }

  private sitesOf(ref: NameRef): number[] {
    if (ref.name === "all") return this.lattice ? this.lattice.sites.map((s) => s.index) : [];
    const i = this.site(ref);
    return i === null ? [] : [i];
  }

  private applyG(sites: Site[]): void {
    for (const s of this.statementsOf("g")) {
      const targets = this.sitesOf(s.site);
      const v = this.eval(s.value);
      if (!v) continue;
      if (v.energy !== 0 || v.field !== 0) {
        this.report(diag("spw-unit-mismatch", s.value.span, `A g-tensor is a pure number, but this is ${dimensionName(v)}.`));
        continue;
      }
      let g: Mat3;
      if (isScalarLike(v)) g = scaleMat3(IDENTITY3, v.data[0] ?? 0);
      else if (v.shape.length === 1 && v.shape[0] === 3) g = diag3(v.data[0] ?? 0, v.data[1] ?? 0, v.data[2] ?? 0);
      else if (v.shape.length === 2 && v.shape[0] === 3 && v.shape[1] === 3) g = mat3([v.data.slice(0, 3), v.data.slice(3, 6), v.data.slice(6, 9)]);
      else {
        this.report(diag("spw-value-kind", s.value.span, "A g-tensor is a number, a vector (gx, gy, gz) or a 3x3 matrix [[...], [...], [...]]."));
        continue;
      }
      if (normMat3(subMat3(g, transpose3(g))) > 1e-9 * Math.max(1, normMat3(g))) {
        this.report(
          diag("spw-g-asymmetric", s.value.span, "This g-tensor is not symmetric; a physical g-tensor usually is (check the transposition)."),
        );
      }
      const sym = scaleMat3(addMat3(g, transpose3(g)), 0.5);
      if (symmetricEigenvalues3(sym)[0] <= 0) {
        this.report(
          diag("spw-g-not-positive", s.value.span, "This g-tensor is not positive definite (an eigenvalue is zero or negative); check the signs."),
        );
      }
      for (const t of targets) {
        const site = sites[t];
        if (site) sites[t] = { ...site, g, gSpan: s.span };
      }
    }
  }

  // ---- exchange ---------------------------------------------------------------------------

  private buildExchanges(sign: 1 | -1): ExchangeTerm[] {
    const out: ExchangeTerm[] = [];
    const seen = new Map<string, { span: Span; kind: ExchangeKind; reversed: boolean }>();
    const memo = this.memo;
    const lattice = this.lattice;
    const previousLattice = memo?.lattice ?? null;
    const latticeSame = memo !== null && sameLatticeForBonds(previousLattice, lattice);
    if (memo) memo.lattice = lattice;
    /** Adds the term, or `before` (the term this statement made last time, with this sign) when it reads the same. */
    const push = (s: ExchangeStatement, kind: ExchangeKind, written: { matrix: Mat3; scale: number }, bonds: Bond[], before: ExchangeTerm | null = null): ExchangeTerm => {
      const first = s.args[0];
      const couplingName = first && first.kind === "name" && this.paramStatements.has(first.name) ? first.name : null;
      // The same object when nothing differs keeps the physics memo's comparison to one check.
      const term: ExchangeTerm =
        before && before.index === out.length && before.kind === kind && before.couplingName === couplingName && before.writtenMatrixMeV === written.matrix && sameBonds(before.bonds, bonds)
          ? before
          : {
              index: out.length,
              kind,
              span: s.span,
              kindSpan: s.exchangeKind.span,
              argsSpan: s.argsSpan,
              couplingName,
              writtenMatrixMeV: written.matrix,
              ...withParts(scaleMat3(written.matrix, sign)),
              scaleMeV: written.scale,
              bonds,
            };
      out.push(term);
      return term;
    };
    for (const s of this.statementsOf("exchange")) {
      const kept = latticeSame && lattice ? memo?.exchanges.get(s) : undefined;
      if (kept && lattice && kept.lattice === previousLattice && this.canReplay(kept)) {
        kept.lattice = lattice;
        for (const occurrence of kept.symbols) this.symbols.push(occurrence);
        const kind = s.exchangeKind.name as ExchangeKind;
        kept.term = push(s, kind, kept.written, this.placeBonds(kind, kept.requests, lattice, seen), kept.sign === sign ? kept.term : null);
        kept.sign = sign;
        continue;
      }
      const { value: built, events, symbols, clean } = this.recorded(() => this.buildExchange(s, seen));
      if (!built) continue;
      const term = push(s, built.kind, built.written, built.bonds);
      if (memo && lattice && built.requests && clean) {
        memo.exchanges.set(s, { lattice, events, symbols, written: built.written, requests: built.requests, term, sign });
      } else memo?.exchanges.delete(s);
    }
    return out;
  }

  /** One exchange statement: its kind, matrix and bonds (null when it cannot be built). */
  private buildExchange(
    s: ExchangeStatement,
    seen: Map<string, { span: Span; kind: ExchangeKind; reversed: boolean }>,
  ): { kind: ExchangeKind; written: { matrix: Mat3; scale: number }; bonds: Bond[]; requests: BondRequest[] | null } | null {
    const kindName = s.exchangeKind.name;
    if (s.args.length === 0 && !(EXCHANGE_KINDS as readonly string[]).includes(kindName) && this.paramStatements.has(kindName)) {
      // `exchange J on ...`: the coupling written where its kind goes.
      this.report(
        diag(
          "spw-kind-unknown",
          s.exchangeKind.span,
          `'${kindName}' is a parameter, not an exchange kind: write exchange heisenberg(${kindName}) for an isotropic coupling, or another kind with ${kindName} as its first argument.`,
          { data: { name: kindName, suggestions: [`heisenberg(${kindName})`] } },
        ),
      );
      return null;
    }
    if (!(EXCHANGE_KINDS as readonly string[]).includes(kindName)) {
      const suggestions = closest(kindName, [...EXCHANGE_KINDS]);
      this.report(
        diag(
          "spw-kind-unknown",
          s.exchangeKind.span,
          `Unknown exchange kind '${kindName}'${suggestions[0] ? `; did you mean ${suggestions[0]}?` : "."} Kinds: heisenberg(J), xxz(J, delta), xyz(Jx, Jy, Jz), dm(D, (x, y, z)), matrix([[...]]).`,
          { data: { name: kindName, suggestions } },
        ),
      );
      return null;
    }
    const kind = kindName as ExchangeKind;
    const written = this.exchangeMatrix(kind, s);
    const requests = this.bondRequests(s);
    const bonds = this.lattice && requests ? this.placeBonds(kind, requests, this.lattice, seen) : [];
    if (!written) return null;
    if (written.matrix.every((row) => row.every((x) => x === 0))) {
      this.report(
        diag("spw-term-zero", s.span, `This ${kind} term is zero (every entry of its exchange matrix is 0): it adds nothing to the Hamiltonian. Give it a value, or remove it.`, {
          tags: ["unnecessary"],
        }),
      );
    }
    return { kind, written, bonds, requests };
  }

  private exchangeMatrix(kind: ExchangeKind, s: Extract<Statement, { kind: "exchange" }>): { matrix: Mat3; scale: number } | null {
    const args = s.args;
    const wrongCount = (expected: string): null => {
      this.report(diag("spw-kind-arguments", s.argsSpan, `${kind} takes ${expected}; found ${args.length} argument(s).`));
      return null;
    };
    const a0 = args[0];
    switch (kind) {
      case "heisenberg": {
        if (args.length !== 1 || !a0) return wrongCount("one coupling: heisenberg(J)");
        const j = this.energy(a0, "The coupling");
        return j === null ? null : { matrix: scaleMat3(IDENTITY3, j), scale: j };
      }
      case "xxz": {
        const a1 = args[1];
        if ((args.length !== 2 && args.length !== 3) || !a0 || !a1) return wrongCount("a coupling and an anisotropy: xxz(J, delta) or xxz(J, delta, (axis))");
        const j = this.energy(a0, "The coupling");
        const delta = this.dimensionless(a1, "The anisotropy delta");
        const axisExpr = args[2];
        const axis = axisExpr ? this.vector3(axisExpr, "The anisotropy axis", true) : ([0, 0, 1] as Vec3);
        if (j === null || delta === null || !axis) return null;
        const n = normalize3(axis) as Vec3;
        // J (1 - n n^T) + J delta n n^T: XXZ about the axis n.
        const nn = outer3(n, n);
        return { matrix: addMat3(scaleMat3(subMat3(IDENTITY3, nn), j), scaleMat3(nn, j * delta)), scale: j };
      }
      case "xyz": {
        if (args.length !== 3) return wrongCount("three couplings: xyz(Jx, Jy, Jz)");
        const js = args.map((a, k) => this.energy(a, `The coupling J${"xyz"[k]}`));
        if (js.some((x) => x === null)) return null;
        const [jx, jy, jz] = js as [number, number, number];
        return { matrix: diag3(jx, jy, jz), scale: (jx + jy + jz) / 3 };
      }
      case "dm": {
        const a1 = args[1];
        if (args.length !== 2 || !a0 || !a1) return wrongCount("a strength and a direction: dm(D, (x, y, z))");
        const d = this.energy(a0, "The DM strength");
        const axis = this.vector3(a1, "The DM direction", true);
        if (d === null || !axis) return null;
        const dv = scale3(normalize3(axis) as Vec3, d);
        // S_i . J . S_j = D . (S_i x S_j) for J_yz = D_x, J_zy = -D_x and cyclic, i.e. J = -[D]_x.
        return { matrix: scaleMat3(crossMatrix3(dv), -1), scale: d };
      }
      case "matrix": {
        if (args.length !== 1 && args.length !== 2) return wrongCount("a 3x3 energy matrix, or a coupling and a pure-number matrix: matrix([[...]]) or matrix(J, [[...]])");
        const mExpr = args.length === 2 ? args[1] : a0;
        const jExpr = args.length === 2 ? a0 : undefined;
        if (!mExpr) return null;
        const m = this.eval(mExpr);
        const j = jExpr ? this.energy(jExpr, "The coupling") : 1;
        if (!m || j === null) return null;
        if (m.shape.length !== 2 || m.shape[0] !== 3 || m.shape[1] !== 3) {
          this.report(diag("spw-value-kind", mExpr.span, "The exchange matrix must be 3x3: [[Jxx, Jxy, Jxz], [Jyx, Jyy, Jyz], [Jzx, Jzy, Jzz]]."));
          return null;
        }
        const needEnergy = jExpr === undefined;
        if (needEnergy && !(m.energy === 1 && m.field === 0)) {
          this.report(diag(m.energy === 0 && m.field === 0 ? "spw-unit-missing" : "spw-unit-mismatch", mExpr.span, "The exchange matrix needs an energy unit: write matrix(J, [[...]]) with J an energy, or give the entries units."));
          return null;
        }
        if (!needEnergy && !(m.energy === 0 && m.field === 0)) {
          this.report(diag("spw-unit-mismatch", mExpr.span, "With a coupling in front, the matrix must be pure numbers."));
          return null;
        }
        const mm = scaleMat3(mat3([m.data.slice(0, 3), m.data.slice(3, 6), m.data.slice(6, 9)]), j);
        return { matrix: mm, scale: (mm[0][0] + mm[1][1] + mm[2][2]) / 3 };
      }
    }
  }

  /**
   * The bonds an exchange statement asks for, in order, before the duplicate check (null without
   * a lattice: then only the site names are checked).
   */
  private bondRequests(s: ExchangeStatement): BondRequest[] | null {
    const lattice = this.lattice;
    if (!lattice) {
      for (const b of s.bonds) if (b.kind === "explicit") this.site(b.from), this.site(b.to);
      return null;
    }
    const positions = lattice.sites.map((x) => x.position);
    const requests: BondRequest[] = [];
    for (const b of s.bonds) {
      if (b.kind === "shell") {
        if (!Number.isInteger(b.shell) || b.shell < 1 || b.shell > 6) {
          this.report(diag("spw-shell-empty", b.shellSpan, "A neighbour shell is a whole number from 1 (nearest) to 6."));
          continue;
        }
        const shells = neighbourShells(lattice.vectors, positions, b.shell);
        const list = shells.bonds[b.shell - 1];
        if (!list || list.length === 0) {
          this.report(diag("spw-shell-empty", b.shellSpan, `The lattice has no neighbour shell ${b.shell} within the search range.`));
          continue;
        }
        for (const x of list) requests.push({ from: x.from, to: x.to, offset: x.offset, span: b.span, shell: b.shell });
        continue;
      }
      const from = this.site(b.from);
      const to = this.site(b.to);
      let offset: number[] = new Array<number>(lattice.dimension).fill(0);
      if (b.offset) {
        const v = this.eval(b.offset);
        if (!v) continue;
        const comps = v.shape.length === 0 ? [...v.data] : v.shape.length === 1 ? [...v.data] : null;
        if (!comps || v.energy !== 0 || v.field !== 0) {
          this.report(diag("spw-offset-dimension", b.offset.span, `A cell offset is a tuple of ${lattice.dimension} whole number(s), e.g. (${new Array(lattice.dimension).fill(1).join(", ")}).`));
          continue;
        }
        if (comps.length !== lattice.dimension) {
          this.report(
            diag(
              "spw-offset-dimension",
              b.offset.span,
              `This ${lattice.dimension}D lattice needs ${lattice.dimension} offset component(s), found ${comps.length}; write (${[...comps, 0, 0, 0].slice(0, lattice.dimension).map(fmt).join(", ")}).`,
            ),
          );
          continue;
        }
        if (comps.some((x) => !Number.isInteger(x))) {
          this.report(
            diag("spw-offset-noninteger", b.offset.span, `Cell offsets count whole cells; found (${comps.map(fmt).join(", ")}). Round them or add a site at that position.`),
          );
          continue;
        }
        offset = comps.map((x) => x || 0);
      }
      if (from === null || to === null) continue;
      if (from === to && offset.every((x) => x === 0)) {
        this.report(
          diag("spw-bond-self", b.span, `A bond from ${b.from.name} to itself in the same cell; add a cell offset, e.g. ${b.from.name} -> ${b.to.name} + (${["1", ...new Array(lattice.dimension - 1).fill("0")].join(", ")}).`),
        );
        continue;
      }
      requests.push({ from, to, offset, span: b.span, shell: null });
    }
    return requests;
  }

  /**
   * The bonds of `requests`, each once: a bond already given (by this or an earlier statement of
   * the same kind) is reported as counted twice and left out.
   */
  private placeBonds(kind: ExchangeKind, requests: readonly BondRequest[], lattice: Lattice, seen: Map<string, { span: Span; kind: ExchangeKind; reversed: boolean }>): Bond[] {
    const bonds: Bond[] = [];
    for (const r of requests) {
      const key = (r.key ??= `${kind}:${bondKey(r.from, r.to, r.offset)}`);
      const prev = seen.get(key);
      if (prev) {
        const where = describeBond(lattice, r.from, r.to, r.offset);
        // Written from the other end, a term's antisymmetric part enters with the opposite sign
        // (S_j . J . S_i = S_i . J^T . S_j, derivable): two dm terms then cancel, not add.
        const flipped = (kind === "dm" || kind === "matrix") && writtenReversed(r) !== prev.reversed;
        const consequence = !flipped
          ? "it would be counted twice. Remove one of them."
          : kind === "dm"
            ? "written from its other end, its DM vector enters with the opposite sign (S_j.J.S_i = S_i.Jᵀ.S_j), so the two would cancel (wholly or in part) rather than add. Only the first is kept; remove one of them, or write both from the same end."
            : "written from its other end, its symmetric part would be counted twice and its antisymmetric (DM) part, if any, would enter with the opposite sign (S_j.J.S_i = S_i.Jᵀ.S_j). Only the first is kept; remove one of them.";
        this.report(
          diag("spw-bond-duplicate", r.span, `This ${kind} bond ${where} is already given; ${consequence}`, {
            related: [{ span: prev.span, message: "the bond given first" }],
            data: { bond: where },
          }),
        );
        continue;
      }
      if (!r.bond) {
        const c = canonicalBond(r.from, r.to, r.offset);
        const distance = Math.hypot(...bondVector(lattice.vectors, lattice.sites.map((x) => x.position), c.from, c.to, c.offset));
        r.bond = { from: c.from, to: c.to, offset: c.offset, distance, span: r.span, shell: r.shell, reversed: writtenReversed(r) };
      }
      seen.set(key, { span: r.span, kind, reversed: r.bond.reversed });
      bonds.push(r.bond);
    }
    return bonds;
  }

  // ---- single-ion, field, cluster, probe, expect --------------------------------------------

  private buildSingleIon(): SingleIonTerm[] {
    const out: SingleIonTerm[] = [];
    for (const s of this.statementsOf("anisotropy")) {
      const targets = this.sitesOf(s.site);
      let d = 0;
      let e = 0;
      let m: Mat3 | null = null;
      let ok = true;
      for (const c of s.clauses) {
        if (c.name.name === "D") d = this.energy(c.value, "The single-ion D") ?? ((ok = false), 0);
        else if (c.name.name === "E") e = this.energy(c.value, "The single-ion E") ?? ((ok = false), 0);
        else if (c.name.name === "matrix") {
          const v = this.eval(c.value);
          if (!v || v.shape.length !== 2 || v.shape[0] !== 3 || v.shape[1] !== 3 || v.energy !== 1 || v.field !== 0) {
            this.report(diag("spw-anisotropy-invalid", c.value.span, "A single-ion matrix is a 3x3 matrix of energies, e.g. [[0, 0, 0], [0, 0, 0], [0, 0, 1]] * D."));
            ok = false;
          } else m = mat3([v.data.slice(0, 3), v.data.slice(3, 6), v.data.slice(6, 9)]);
        } else {
          this.report(diag("spw-anisotropy-invalid", c.name.span, `Unknown single-ion clause '${c.name.name}': write D = ..., E = ..., axis (x, y, z) or matrix = [[...]].`));
          ok = false;
        }
      }
      if (s.clauses.length === 0) {
        this.report(diag("spw-anisotropy-invalid", s.span, "A single-ion term needs D = ... (and optionally E = ... and axis (x, y, z))."));
        continue;
      }
      const axis = s.axis ? this.vector3(s.axis, "The anisotropy axis", true) : ([0, 0, 1] as Vec3);
      if (!ok || !axis) continue;
      let a: Mat3;
      if (m) a = scaleMat3(addMat3(m, transpose3(m)), 0.5);
      else {
        const n = normalize3(axis) as Vec3;
        // The x axis of the E term: the global x (or y) direction made perpendicular to n.
        const ref: Vec3 = Math.abs(n[0]) < 0.9 ? [1, 0, 0] : [0, 1, 0];
        const x = normalize3(sub3(ref, scale3(n, dot3(ref, n)))) as Vec3;
        const y: Vec3 = [n[1] * x[2] - n[2] * x[1], n[2] * x[0] - n[0] * x[2], n[0] * x[1] - n[1] * x[0]];
        a = addMat3(scaleMat3(outer3(n, n), d), scaleMat3(subMat3(outer3(x, x), outer3(y, y)), e));
      }
      const halfSpin = targets.filter((t) => this.lattice?.sites[t]?.spin === 0.5);
      if (targets.length > 0 && halfSpin.length === targets.length) {
        this.report(
          diag(
            "spw-single-ion-constant",
            s.span,
            "For spin 1/2 a single-ion term is a constant ((S^a)^2 = 1/4): it has no effect on the physics. Remove it, or give the site a larger spin.",
            { tags: ["unnecessary"] },
          ),
        );
      }
      for (const t of targets) out.push({ site: t, span: s.span, matrixMeV: a });
    }
    return out;
  }

  private buildField(): FieldSpec | null {
    const s = this.once("field", "field");
    return s ? this.keptOrBuilt(s, (x) => this.fieldOf(x)) : null;
  }

  private fieldOf(s: Extract<Statement, { kind: "field" }>): FieldSpec | null {
    const magnitude = this.fieldValue(s.magnitude, "The field");
    const dirRaw = s.direction ? this.vector3(s.direction, "The field direction", true) : ([0, 0, 1] as Vec3);
    if (magnitude === null || !dirRaw) return null;
    const direction = normalize3(dirRaw) as Vec3;
    let sweep: FieldSpec["sweep"] = null;
    if (s.sweep) {
      const from = this.fieldValue(s.sweep.from, "The sweep start");
      const to = this.fieldValue(s.sweep.to, "The sweep end");
      const steps = s.sweep.steps ? this.dimensionless(s.sweep.steps, "The number of sweep steps") : 25;
      if (from !== null && to !== null && steps !== null) {
        if (!Number.isInteger(steps) || steps < 2 || steps > 2000 || !(to > from)) {
          this.report(diag("spw-sweep-invalid", s.sweep.span, "A sweep goes from a lower to a higher field in 2 to 2000 steps, e.g. sweep 0 T to 12 T steps 50."));
        } else sweep = { fromT: from, toT: to, steps, span: s.sweep.span };
      }
    }
    return { span: s.span, magnitudeSpan: s.magnitude.span, magnitudeT: magnitude, direction, vectorT: scale3(direction, magnitude), sweep };
  }

  private fieldValue(e: Expr, what: string): number | null {
    const v = this.eval(e);
    if (!v) return null;
    if (!isScalarLike(v)) {
      this.report(diag("spw-value-kind", e.span, `${what} is a magnitude; give the direction with 'along (x, y, z)'.`));
      return null;
    }
    const x = v.data[0] ?? 0;
    if (v.energy === 0 && v.field === 1) return x;
    if (v.energy === 1 && v.field === 0) {
      this.report(
        diag(
          "spw-unit-mismatch",
          e.span,
          `${what} is an energy (${fmt(x)} meV), but a magnetic field is needed (T, mT, G). If this is the Zeeman energy, divide by g muB: e.g. (${fmt(x)} meV) / (2 * muB).`,
        ),
      );
      return null;
    }
    if (v.energy === 0 && v.field === 0) {
      this.report(diag("spw-unit-missing", e.span, `${what} needs a unit: write e.g. ${fmt(x)} T (or mT, G).`, { data: { value: x } }));
      return null;
    }
    this.report(diag("spw-unit-mismatch", e.span, `${what} is ${dimensionName(v)}; a magnetic field (T, mT, G) is needed.`));
    return null;
  }

  private buildCluster(): ClusterSpec | null {
    const s = this.once("cluster", "cluster");
    return s ? this.keptOrBuilt(s, (x) => this.clusterOf(x)) : null;
  }

  private clusterOf(s: Extract<Statement, { kind: "cluster" }>): ClusterSpec | null {
    const dim = this.lattice?.dimension ?? 1;
    // "cluster 4 x 4" (as the report prints a size) reads as 4 in a unit named x, then a stray 4.
    const size = s.size;
    if (size.kind === "number" && size.unit && (size.unit.name === "x" || size.unit.name === "X")) {
      const example = `(${new Array(Math.max(dim, 2)).fill(size.text).join(", ")})`;
      this.report(diag("spw-cluster-invalid", size.span, `'${size.text} ${size.unit.name} ...' is not a cluster size: give the cells per lattice direction as a tuple, e.g. cluster ${example} periodic.`));
      return null;
    }
    const v = this.eval(s.size);
    if (!v) return null;
    const comps = v.shape.length <= 1 ? [...v.data] : null;
    if (!comps || v.energy !== 0 || v.field !== 0 || comps.some((x) => !Number.isInteger(x) || x < 1 || x > 4096)) {
      this.report(diag("spw-cluster-invalid", s.size.span, "A cluster size counts unit cells: a whole number per lattice direction, e.g. cluster 20 periodic or cluster (6, 6) periodic."));
      return null;
    }
    // Without a lattice its dimension is unknown: the lattice's own diagnostic comes first.
    if (this.lattice && comps.length !== dim && comps.length !== 1) {
      this.report(
        diag(
          "spw-cluster-invalid",
          s.size.span,
          dim === 1 ? "This 1D lattice takes one cluster size, e.g. cluster 8 periodic." : `This ${dim}D lattice needs ${dim} cluster sizes, e.g. (${new Array(dim).fill(4).join(", ")}).`,
        ),
      );
      return null;
    }
    const cells = comps.length === dim ? comps : new Array<number>(dim).fill(comps[0] ?? 1);
    return { span: s.span, cells, boundary: s.boundary?.name === "open" ? "open" : "periodic" };
  }

  private buildProbe(): ProbeSpec | null {
    const s = this.once("probe", "probe");
    return s ? this.keptOrBuilt(s, (x) => this.probeOf(x)) : null;
  }

  private probeOf(s: Extract<Statement, { kind: "probe" }>): ProbeSpec | null {
    const e = this.energy(s.value, "The probe frequency");
    if (e === null) return null;
    if (!(e > 0)) {
      this.report(diag("spw-value-invalid", s.value.span, "A probe frequency must be positive, e.g. probe 240 GHz."));
      return null;
    }
    return { span: s.span, energyMeV: e };
  }

  private buildExpect(): ExpectSpec | null {
    const s = this.once("expect", "expect");
    return s ? this.keptOrBuilt(s, (x) => this.expectOf(x)) : null;
  }

  private expectOf(s: Extract<Statement, { kind: "expect" }>): ExpectSpec | null {
    const c = s.claim.name;
    if (c !== "su2" && c !== "u1" && c !== "none") {
      // SU(2), U(1), SU2, None as printed: the claim meant, in .spw's spelling.
      const meant = { "su(2)": "su2", "u(1)": "u1", su2: "su2", u1: "u1", none: "none" }[c.toLowerCase().replace(/\s+/g, "")];
      this.report(
        diag(
          "spw-expect-unknown",
          s.claim.span,
          meant
            ? `Write the symmetry as .spw spells it: expect ${meant === "u1" ? "u1 about (x, y, z)" : meant}.`
            : `Unknown symmetry '${c}': write expect su2, expect u1 about (x, y, z), or expect none.`,
          meant ? { data: { suggestions: [meant] } } : {},
        ),
      );
      return null;
    }
    let axis: Vec3 | null = null;
    if (c === "u1") {
      if (!s.axis) {
        this.report(diag("spw-expect-unknown", s.claim.span, "A U(1) claim names its axis: expect u1 about (0, 0, 1)."));
        return null;
      }
      const a = this.vector3(s.axis, "The U(1) axis", true);
      if (!a) return null;
      axis = normalize3(a);
    } else if (s.axis) {
      this.report(diag("spw-expect-unknown", s.axis.span, `Only a u1 claim takes an axis; write 'expect ${c}'.`));
    }
    return { span: s.span, claimSpan: s.claim.span, claim: c, axis };
  }
}

function independent(vectors: readonly Vec3[]): boolean {
  if (vectors.length === 0) return false;
  // Gram determinant > 0 for linearly independent vectors.
  const n = vectors.length;
  const gram: number[][] = vectors.map((a) => vectors.map((b) => dot3(a, b)));
  const det = n === 1 ? (gram[0]?.[0] ?? 0) : n === 2 ? (gram[0]?.[0] ?? 0) * (gram[1]?.[1] ?? 0) - (gram[0]?.[1] ?? 0) ** 2 : det3x3(gram);
  const scale = vectors.reduce((p, v) => p * dot3(v, v), 1);
  return det > 1e-12 * scale;
}

function det3x3(g: number[][]): number {
  const a = (i: number, j: number): number => g[i]?.[j] ?? 0;
  return (
    a(0, 0) * (a(1, 1) * a(2, 2) - a(1, 2) * a(2, 1)) -
    a(0, 1) * (a(1, 0) * a(2, 2) - a(1, 2) * a(2, 0)) +
    a(0, 2) * (a(1, 0) * a(2, 1) - a(1, 1) * a(2, 0))
  );
}

export function describeBond(lattice: Lattice, from: number, to: number, offset: readonly number[]): string {
  const name = (i: number): string => lattice.sites[i]?.name ?? `#${i}`;
  const off = offset.some((x) => x !== 0) ? ` + (${offset.join(", ")})` : "";
  return `${name(from)} -> ${name(to)}${off}`;
}

/** Formats a number for messages: up to 6 significant digits, no trailing zeros. */
export function fmt(x: number): string {
  if (!Number.isFinite(x)) return String(x);
  if (x === 0) return "0";
  const s = Math.abs(x) >= 1e-3 && Math.abs(x) < 1e6 ? String(Number(x.toPrecision(6))) : x.toExponential(4);
  return s;
}

/** The request was written from its other end: the canonical form swaps the sites (or, on one site, negates the offset). */
function writtenReversed(r: { readonly from: number; readonly to: number; readonly offset: readonly number[] }): boolean {
  const c = canonicalBond(r.from, r.to, r.offset);
  return c.from !== r.from || c.to !== r.to || c.offset.some((n, k) => n !== (r.offset[k] ?? 0));
}
