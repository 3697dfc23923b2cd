// The semantic model of a .spw file: resolved parameters, the lattice with positions, bonds
// expanded, 3x3 exchange matrices in the Hamiltonian's own sign (H = + sum S_i.J.S_j), single-ion
// tensors, g-tensors, the field and the cluster. Canonical units: meV, T, GHz. Model layer.
import type { Span } from "../base/text";
import type { ExchangeDecomposition } from "../physics/symmetry";
import { transpose3 } from "../physics/linalg3";
import type { Mat3, Vec3 } from "../physics/types";
import type { Value } from "./evaluate";

export type ExchangeKind = "heisenberg" | "xxz" | "xyz" | "dm" | "matrix";
export const EXCHANGE_KINDS: readonly ExchangeKind[] = ["heisenberg", "xxz", "xyz", "dm", "matrix"];

export interface Parameter {
  readonly name: string;
  readonly nameSpan: Span;
  readonly statementSpan: Span;
  readonly valueSpan: Span;
  /** Null when the value could not be computed (a diagnostic says why). */
  readonly value: Value | null;
}

export interface Site {
  readonly index: number;
  readonly name: string;
  /** Where the site is named (preset `sites` list or custom `site` statement), if anywhere. */
  readonly nameSpan: Span | null;
  readonly position: Vec3;
  readonly spin: number;
  readonly g: Mat3;
  readonly gSpan: Span | null;
}

export interface Lattice {
  readonly preset: string | null;
  readonly span: Span;
  readonly vectors: readonly Vec3[];
  readonly sites: readonly Site[];
  readonly dimension: number;
}

export interface Bond {
  readonly from: number;
  readonly to: number;
  /** Cell offset of `to` relative to `from` (one integer per lattice vector). */
  readonly offset: readonly number[];
  /** Length in lattice units. */
  readonly distance: number;
  /** Span of the bond specification (`Cu -> Cu + (1)` or `shell 1`). */
  readonly span: Span;
  /** Neighbour shell the bond belongs to (1 = nearest). */
  readonly shell: number | null;
  /**
   * The bond is stored in canonical orientation (model/lattice canonicalBond); true when the file
   * wrote it from its other end (`B -> A + (-n)`). Then the term's matrix J acts as
   * S_to . J . S_from, which is S_from . J^T . S_to in the stored orientation (operators on
   * different sites commute): use `bondMatrix`.
   */
  readonly reversed: boolean;
}

export interface ExchangeTerm {
  readonly index: number;
  readonly kind: ExchangeKind;
  readonly span: Span;
  readonly kindSpan: Span;
  readonly argsSpan: Span;
  /** Parameter named as the first argument, if it is a plain name. */
  readonly couplingName: string | null;
  /** The matrix as written, before the sign convention (meV). */
  readonly writtenMatrixMeV: Mat3;
  /** The matrix in H = + sum_bonds S_i . J . S_j, after the file's convention (meV). */
  readonly matrixMeV: Mat3;
  /** `matrixMeV` split into isotropic, DM and symmetric traceless parts (made once per term). */
  readonly parts: ExchangeDecomposition;
  /** The coupling's leading scale as written (J for heisenberg/xxz, |D| for dm ...), meV. */
  readonly scaleMeV: number;
  readonly bonds: readonly Bond[];
}

export interface SingleIonTerm {
  readonly site: number;
  readonly span: Span;
  /** S . A . S (meV), symmetric. */
  readonly matrixMeV: Mat3;
}

export interface FieldSpec {
  readonly span: Span;
  readonly magnitudeSpan: Span;
  readonly magnitudeT: number;
  readonly direction: Vec3;
  readonly vectorT: Vec3;
  readonly sweep: { readonly fromT: number; readonly toT: number; readonly steps: number; readonly span: Span } | null;
}

export interface ClusterSpec {
  readonly span: Span;
  /** Cells along each lattice vector. */
  readonly cells: readonly number[];
  readonly boundary: "periodic" | "open";
}

export interface ProbeSpec {
  readonly span: Span;
  readonly energyMeV: number;
}

export type SymmetryClass = "su2" | "u1" | "none";

export interface ExpectSpec {
  readonly span: Span;
  readonly claimSpan: Span;
  readonly claim: SymmetryClass;
  readonly axis: Vec3 | null;
}

export type SymbolKind = "parameter" | "site" | "vector";

export interface SymbolOccurrence {
  readonly name: string;
  readonly kind: SymbolKind;
  readonly span: Span;
  readonly isDefinition: boolean;
}

export interface SpinModel {
  readonly name: string;
  readonly nameSpan: Span;
  readonly span: Span;
  readonly convention: { readonly value: "antiferro-positive" | "ferro-positive"; readonly span: Span } | null;
  /** +1 for antiferro-positive (H = +J S.S), -1 for ferro-positive (H = -J S.S). */
  readonly sign: 1 | -1;
  readonly lattice: Lattice | null;
  /**
   * Every parameter the file defines, by name. The order of the map is not meaningful (a build
   * from the version before keeps the earlier order); list parameters by statement position.
   */
  readonly parameters: ReadonlyMap<string, Parameter>;
  readonly exchanges: readonly ExchangeTerm[];
  readonly singleIon: readonly SingleIonTerm[];
  readonly field: FieldSpec | null;
  readonly cluster: ClusterSpec | null;
  readonly probe: ProbeSpec | null;
  readonly expect: ExpectSpec | null;
  /** Definitions of and references to names, in no meaningful order (sort by span to list them). */
  readonly symbols: readonly SymbolOccurrence[];
}

/**
 * The matrix J_b of one bond of a term in the bond's stored orientation, H_b = S_from . J_b . S_to:
 * the term's matrix, transposed when the file wrote the bond from its other end (derivable:
 * S_a . J . S_b = S_b . J^T . S_a for operators on different sites).
 */
export function bondMatrix(term: { readonly matrixMeV: Mat3 }, bond: Bond): Mat3 {
  return bond.reversed ? transpose3(term.matrixMeV) : term.matrixMeV;
}
