// Spin-rotation symmetry of a model: feeds every bond tensor, single-ion tensor and effective
// field of the unit cell to the physics layer's classifier, then maps findings back to source
// ranges and checks the file's `expect` claim. Analysis layer.
import { diag, type Diagnostic, type RelatedInfo } from "../base/diagnostics";
import type { Span } from "../base/text";
import { bondKeyOf } from "../model/lattice";
import { bondMatrix, type ExchangeTerm, type SpinModel, type SymmetryClass } from "../model/model";
import { MU_B_MEV_PER_T } from "../model/units";
import { dot3, mulMatVec3, scale3, transpose3 } from "../physics/linalg3";
import { classifySymmetry, sameAxis, type BondTensorInput, type FindingKind, type SymmetryClassification } from "../physics/symmetry";
import type { Mat3, Vec3 } from "../physics/types";

export interface BreakingTerm {
  readonly kind: FindingKind;
  /** Where the term is written (the exchange, anisotropy, g or field statement). */
  readonly span: Span;
  readonly residual: "u1" | "none";
  readonly axis: Vec3 | null;
  readonly consequence: string;
  readonly magnitudeMeV: number;
}

export interface SymmetryResult {
  readonly classification: SymmetryClassification;
  readonly h0: SymmetryClass;
  readonly axis: Vec3 | null;
  readonly full: SymmetryClass;
  readonly fullAxis: Vec3 | null;
  readonly breaking: readonly BreakingTerm[];
}

/** Effective Zeeman field h_s = muB g_s^T B of each basis site, meV. */
export function siteFieldsMeV(model: SpinModel): Vec3[] {
  const B: Vec3 = model.field?.vectorT ?? [0, 0, 0];
  return (model.lattice?.sites ?? []).map((s) => scale3(mulMatVec3(transpose3(s.g), B), MU_B_MEV_PER_T));
}

/** The classifier's ids of exchange terms by index, made once ("exchange:3"), and back. */
const EXCHANGE_IDS: string[] = [];
const EXCHANGE_INDEX = new Map<string, number>();

function exchangeId(index: number): string {
  let id = EXCHANGE_IDS[index];
  if (id === undefined) {
    id = EXCHANGE_IDS[index] = `exchange:${index}`;
    EXCHANGE_INDEX.set(id, index);
  }
  return id;
}

/** Bit of each finding kind, for the per-place set of kinds already reported. */
const KIND_BIT: Record<FindingKind, number> = {
  "exchange-anisotropy": 1,
  dm: 2,
  "off-diagonal-symmetric": 4,
  "single-ion": 8,
  "single-ion-rhombic": 16,
  "non-uniform-field": 32,
  "transverse-field": 64,
};

const CARRIES_DM = 1;
const CARRIES_ANISOTROPY = 2;
/** Which breaking parts an exchange term carries itself, by term (a function of its parts). */
const carried = new WeakMap<ExchangeTerm, number>();

function carries(term: ExchangeTerm): number {
  let bits = carried.get(term);
  if (bits === undefined) {
    const d = term.parts;
    const tol = 1e-12 * Math.max(1e-300, Math.abs(d.isotropic) + d.norms.dm + d.norms.anisotropic);
    bits = (d.norms.dm > tol ? CARRIES_DM : 0) | (d.norms.anisotropic > tol ? CARRIES_ANISOTROPY : 0);
    carried.set(term, bits);
  }
  return bits;
}

/**
 * Site-pair numbers by bond key. Any injective numbering groups bonds the same way (the classifier
 * sums bonds of one pair, in input order), so the numbers are handed out once and kept: a term's
 * inputs then stay valid for as long as the term object lives. Numbers are never reused; when
 * they run high, numbering starts afresh together with the inputs made from it.
 */
let pairNumbers = new Map<string, number>();
/** The classifier inputs of an exchange term, one per bond (made once per term object). */
let termInputs = new WeakMap<ExchangeTerm, readonly BondTensorInput[]>();

function inputsOf(term: ExchangeTerm): readonly BondTensorInput[] {
  let inputs = termInputs.get(term);
  if (inputs) return inputs;
  if (pairNumbers.size >= 1 << 24) {
    pairNumbers = new Map();
    termInputs = new WeakMap();
  }
  const id = exchangeId(term.index);
  const made: BondTensorInput[] = [];
  for (const b of term.bonds) {
    const key = bondKeyOf(b);
    let p = pairNumbers.get(key);
    if (p === undefined) {
      p = pairNumbers.size;
      pairNumbers.set(key, p);
    }
    // Distinct bonds are distinct operators: give each its own pair of indices.
    made.push({ id, matrix: bondMatrix(term, b), sites: [2 * p, 2 * p + 1] });
  }
  termInputs.set(term, made);
  return made;
}

/** Whether a 3x3 matrix is a multiple of the identity (exactly: as written, an isotropic g is). */
function isScalarMatrix(m: Mat3): boolean {
  const [a, b, c] = m;
  return a[1] === 0 && a[2] === 0 && b[0] === 0 && b[2] === 0 && c[0] === 0 && c[1] === 0 && a[0] === b[1] && b[1] === c[2];
}

export function analyzeSymmetry(model: SpinModel): SymmetryResult {
  // Where each classifier id is written: exchange terms by index, the rest by id.
  const termOf: (ExchangeTerm | undefined)[] = [];
  const spans = new Map<string, Span>();
  const bonds: BondTensorInput[] = [];
  for (const term of model.exchanges) {
    termOf[term.index] = term;
    for (const input of inputsOf(term)) bonds.push(input);
  }
  const sites = model.lattice?.sites ?? [];
  const singleIon = model.singleIon.map((t, k) => {
    const id = `single-ion:${k}`;
    spans.set(id, t.span);
    return { id, matrix: t.matrixMeV, spin: sites[t.site]?.spin ?? 0.5, site: t.site };
  });
  // A site's effective field is g^T B: a site-dependent field comes from the g statements, and so
  // does a transverse one when g is anisotropic; with an isotropic g it is the field's direction.
  const transverseSpans = new Map<string, Span>();
  const fields = siteFieldsMeV(model).map((vector, s) => {
    const id = `field:${s}`;
    const gSpan = sites[s]?.gSpan ?? model.field?.span ?? model.nameSpan;
    spans.set(id, gSpan);
    const g = sites[s]?.g;
    if (model.field && g && isScalarMatrix(g)) transverseSpans.set(id, model.field.span);
    return { id, vector, site: s };
  });
  const c = classifySymmetry({ bonds, singleIon, fields, energyUnit: "meV" });
  const breaking: BreakingTerm[] = [];
  // Kinds already named at each place (span start), as bits of KIND_BIT.
  const named = new Map<number, number>();
  for (const f of c.breaking) {
    for (const id of f.ids) {
      const index = EXCHANGE_INDEX.get(id);
      let span: Span | undefined;
      if (index !== undefined) {
        const term = termOf[index];
        if (!term) continue;
        // Findings are per bond pair; name only the terms that carry the breaking part themselves.
        if (!(carries(term) & (f.kind === "dm" ? CARRIES_DM : CARRIES_ANISOTROPY))) continue;
        span = term.span;
      } else span = (f.kind === "transverse-field" ? transverseSpans.get(id) : undefined) ?? spans.get(id);
      if (!span) continue;
      const bit = KIND_BIT[f.kind];
      const before = named.get(span.start) ?? 0;
      if (before & bit) continue;
      named.set(span.start, before | bit);
      breaking.push({ kind: f.kind, span, residual: f.residual, axis: f.axis, consequence: f.detail, magnitudeMeV: f.magnitude });
    }
  }
  return { classification: c, h0: c.h0, axis: c.h0Axis, full: c.full, fullAxis: c.fullAxis, breaking };
}

export function describeClass(cls: SymmetryClass, axis: Vec3 | null): string {
  if (cls === "su2") return "SU(2)";
  if (cls === "u1") return `U(1) about (${(axis ?? [0, 0, 1]).map((x) => Number(x.toFixed(4))).join(", ")})`;
  return "no continuous spin-rotation symmetry";
}

const KIND_TEXT: Record<FindingKind, string> = {
  "exchange-anisotropy": "anisotropic exchange",
  dm: "a Dzyaloshinskii-Moriya term",
  "off-diagonal-symmetric": "off-diagonal symmetric exchange",
  "single-ion": "a single-ion anisotropy",
  "single-ion-rhombic": "a rhombic single-ion term",
  "non-uniform-field": "a site-dependent effective field (non-uniform g)",
  "transverse-field": "a field transverse to the symmetry axis",
};

export function kindText(kind: FindingKind): string {
  return KIND_TEXT[kind];
}

/** Field findings break only the symmetry H0 leaves, not the SU(2) of H0. */
export function isFieldFinding(kind: FindingKind): boolean {
  return kind === "non-uniform-field" || kind === "transverse-field";
}

interface ExpectTexts {
  readonly claim: SymmetryClass;
  readonly claimAxis: Vec3 | null;
  readonly computed: SymmetryClass;
  readonly axis: Vec3 | null;
  readonly claimText: string;
  readonly computedText: string;
  readonly replacement: string;
}

/** The texts of the last `expect` check: a function of the claim, the computed class and both axes. */
let lastExpectTexts: ExpectTexts | null = null;

function expectTexts(claim: SymmetryClass, claimAxis: Vec3 | null, computed: SymmetryClass, axis: Vec3 | null): ExpectTexts {
  const last = lastExpectTexts;
  if (last && last.claim === claim && last.computed === computed && sameAxis(last.claimAxis, claimAxis) && sameAxis(last.axis, axis)) return last;
  const texts: ExpectTexts = {
    claim,
    claimAxis,
    computed,
    axis,
    claimText: describeClass(claim, claimAxis),
    computedText: describeClass(computed, axis),
    replacement: computed === "u1" ? `u1 about (${(axis ?? [0, 0, 1]).map((x) => Number(x.toFixed(6))).join(", ")})` : computed,
  };
  lastExpectTexts = texts;
  return texts;
}

/** Checks `expect` against the symmetry of H0 (the Hamiltonian without the Zeeman term). */
export function checkExpect(model: SpinModel, sym: SymmetryResult): Diagnostic[] {
  const e = model.expect;
  if (!e) return [];
  const computed = sym.h0;
  const rank = { su2: 2, u1: 1, none: 0 } as const;
  const wrongAxis = e.claim === "u1" && computed === "u1" && e.axis && sym.axis && Math.abs(Math.abs(dot3(e.axis, sym.axis)) - 1) > 1e-6;
  // A claim that holds (most edits) needs none of the texts below.
  if (rank[e.claim] === rank[computed] && !wrongAxis) return [];
  const { computedText, replacement, claimText } = expectTexts(e.claim, e.axis, computed, sym.axis);
  const related: RelatedInfo[] = sym.breaking
    .filter((b) => !isFieldFinding(b.kind))
    .map((b) => ({ span: b.span, message: `${kindText(b.kind)} breaks SU(2) here` }));
  // Offsets would change with every edit above the statement: the fix's extent is a length (from
  // the claim to the end of the statement), so unchanged diagnostics read the same.
  const data = { replacement, replaceLength: e.span.end - e.claimSpan.start };
  if (rank[e.claim] > rank[computed]) {
    return [
      diag(
        "spw-expect-mismatch",
        e.claimSpan,
        `The file expects ${claimText}, but without the field the Hamiltonian has ${computedText}. Remove the breaking terms or write 'expect ${replacement}'.`,
        { related, data },
      ),
    ];
  }
  if (wrongAxis && e.axis) {
    return [
      diag("spw-expect-mismatch", e.claimSpan, `The file expects ${claimText}, but the conserved axis is ${computedText.slice("U(1) about ".length)}. Write 'expect ${replacement}'.`, {
        related,
        data,
      }),
    ];
  }
  if (rank[e.claim] < rank[computed]) {
    return [
      diag(
        "spw-expect-weaker",
        e.claimSpan,
        `The Hamiltonian without the field has ${computedText}, more than 'expect ${e.claim}' claims; write 'expect ${replacement}' to let Spinwright guard it.`,
        { data },
      ),
    ];
  }
  return [];
}
