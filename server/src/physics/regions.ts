// Stability regions of known spin-model families as pure functions of coupling ratios: which
// phase a parameter set lies in, the nearest published (or derivable) boundary and its source.
// Physics layer: numbers in, plain records out. Family detection happens in the model layer.
// Couplings follow physics-notes section 2 (antiferro-positive: J > 0 is antiferromagnetic).

export type FamilyKind =
  | "j1j2-chain"
  | "xxz-chain"
  | "spin1-chain-single-ion"
  | "square-j1j2"
  | "triangular-j1j2"
  | "honeycomb-j1j2"
  | "kagome-j1";

/** Caller's description of a recognised model family (energies in any one unit). */
export type FamilyInput =
  /** Spin-1/2 chain, H = J1 sum S_i.S_{i+1} + J2 sum S_i.S_{i+2}. */
  | { readonly kind: "j1j2-chain"; readonly j1: number; readonly j2: number }
  /** Spin-1/2 chain, H = J sum (Sx Sx + Sy Sy + Delta Sz Sz). */
  | { readonly kind: "xxz-chain"; readonly j: number; readonly delta: number }
  /** Spin-1 chain, H = J sum S_i.S_{i+1} + D sum (S^z_i)^2. */
  | { readonly kind: "spin1-chain-single-ion"; readonly j: number; readonly d: number }
  /** Spin-1/2 Heisenberg J1-J2 models on two-dimensional lattices. */
  | { readonly kind: "square-j1j2" | "triangular-j1j2" | "honeycomb-j1j2"; readonly j1: number; readonly j2: number }
  /** Spin-1/2 nearest-neighbour Heisenberg model on the kagome lattice. */
  | { readonly kind: "kagome-j1"; readonly j1: number };

export type RegionParameter = "J2/J1" | "J2/|J1|" | "Delta" | "D/J" | "J1";

/**
 * Analyses whose assumptions hold in a region (the `validFor` vocabulary). The descriptions say
 * what each needs; the checker layer decides what to run.
 */
export const VALIDITY = {
  "Bethe ansatz": "integrable point or line: exact ground state, magnetization curve, velocities",
  "two-branch splitting": "gapless spin-1/2 chain with SU(2) or U(1) about the field, h << J, m << 1/2",
  "two-magnon bound state": "near saturation, any chain: bound-state branch from the two-magnon problem",
  "one-magnon saturation field": "saturation from the one-magnon instability; multi-magnon bound states may go first for ferro J1",
  "Majumdar-Ghosh dimer state": "exact dimer product ground state, E/N = -3 J1/8 (Majumdar & Ghosh 1969)",
  "spin-wave theory": "magnetically ordered phase, expansion about the classical order",
} as const;
export type Validity = keyof typeof VALIDITY;

export interface RegionBoundary {
  readonly name: string;
  /** Boundary value of the region parameter. */
  readonly value: number;
  readonly source: string;
  /**
   * Absolute uncertainty used to decide "on the boundary": half a unit in the last quoted digit
   * for numerical values (quoting convention, common practice), 0 for exact or derivable ones.
   */
  readonly uncertainty: number;
}

/** Quantum phase picture for a two-dimensional family: ranges from physics-notes section 8. */
export interface QuantumPicture {
  readonly name: string;
  /** True when the value falls inside a band where the published edge is itself uncertain. */
  readonly uncertain: boolean;
  readonly source: string;
}

export interface RegionPlacement {
  readonly family: FamilyKind;
  /** Region name (for two-dimensional families: the classical region; see `quantum`). */
  readonly name: string;
  readonly parameter: RegionParameter;
  readonly value: number;
  /** Nearest boundary in parameter units; null when the family has none on this branch. */
  readonly boundary: RegionBoundary | null;
  /**
   * Signed relative distance to that boundary: (value - b) / |b|, i.e. value/b - 1 for b > 0;
   * positive means above the boundary. For b = 0 the plain difference value - b. Null without
   * a boundary or for an infinite value.
   */
  readonly distance: number | null;
  /** |value - b| <= max(uncertainty, 1e-9 max(1, |b|)). */
  readonly onBoundary: boolean;
  /** Source of the region's identification. */
  readonly source: string;
  /** Whether the spectrum above the ground state is gapless; null when unknown or debated. */
  readonly gapless: boolean | null;
  readonly validFor: readonly Validity[];
  /** Two-dimensional families only: the debated quantum picture. */
  readonly quantum?: QuantumPicture;
  readonly notes: readonly string[];
}

interface RegionInfo {
  readonly name: string;
  readonly source: string;
  readonly gapless: boolean | null;
  readonly validFor: readonly Validity[];
  readonly notes?: readonly string[];
}

/** A parameter axis: ascending boundaries, the open regions between them, the points on them. */
interface RegionAxis {
  readonly parameter: RegionParameter;
  readonly value: number;
  readonly boundaries: readonly RegionBoundary[];
  /** boundaries.length + 1 open intervals. */
  readonly regions: readonly RegionInfo[];
  /** What sits exactly on each boundary. */
  readonly atBoundary: readonly RegionInfo[];
  readonly notes: readonly string[];
  readonly quantum?: (value: number) => QuantumPicture & { readonly gapless: boolean | null; readonly ordered: boolean };
}

// ---------------------------------------------------------------------------------------------
// Sources (cited as in physics-notes sections 5 and 8; marks kept where the notes mark them)
// ---------------------------------------------------------------------------------------------

const OKAMOTO_NOMURA = "Okamoto & Nomura, Phys. Lett. A 169, 433 (1992)";
const MAJUMDAR_GHOSH = "Majumdar & Ghosh, J. Math. Phys. 10, 1388 (1969)";
const HAMADA = "Hamada et al., J. Phys. Soc. Jpn. 57, 1891 (1988) (from memory)";
const BETHE_XXZ = "Bethe ansatz (e.g. Takahashi, Thermodynamics of 1D solvable models, 1999)";
const WHITE_HUSE = "White & Huse, Phys. Rev. B 48, 3844 (1993)";
/**
 * Located with the stored-literature search: the abstract of arXiv:1705.01558 (2017) gives
 * (D/J)c = 0.9684713(1) from DMRG level spectroscopy. Only the abstract was read; the journal
 * reference and the authors are not cited here because physics-notes does not list this work
 * yet (house rule on names); the lead engineer should add the full citation after checking it.
 */
const SPIN1_DC = "arXiv:1705.01558 (2017), DMRG level spectroscopy; value checked against the abstract only";
const NOTES_2D = "ranges as commonly quoted in the literature; from memory, debated, not checked against a single source";
const LUTTINGER_TISZA = "classical energy minimum over wave vectors (Luttinger-Tisza), derivable";

const exact = (name: string, value: number, source: string): RegionBoundary => ({ name, value, source, uncertainty: 0 });

// ---------------------------------------------------------------------------------------------
// Families
// ---------------------------------------------------------------------------------------------

function j1j2ChainAxis(j1: number, j2: number): RegionAxis {
  if (j1 > 0) {
    const value = j2 / j1;
    const bethe: Validity[] = value === 0 ? ["Bethe ansatz"] : [];
    return {
      parameter: "J2/J1",
      value,
      boundaries: [
        { name: "J2c (gapless to dimerized)", value: 0.2411, source: OKAMOTO_NOMURA, uncertainty: 0.00005 },
        exact("Majumdar-Ghosh point", 0.5, MAJUMDAR_GHOSH),
      ],
      regions: [
        {
          name: "gapless Tomonaga-Luttinger liquid",
          source:
            value < 0
              ? `${OKAMOTO_NOMURA} for J2 > 0; for ferro J2 the marginal coupling g0 ~ (J2c - J2) keeps its sign (extrapolation, from memory)`
              : OKAMOTO_NOMURA,
          gapless: true,
          validFor: [...bethe, "two-branch splitting", "two-magnon bound state", "one-magnon saturation field"],
        },
        {
          name: "dimerized (gapped), commensurate short-range correlations",
          source: OKAMOTO_NOMURA,
          gapless: false,
          validFor: ["two-magnon bound state", "one-magnon saturation field"],
        },
        {
          name: "dimerized (gapped), incommensurate short-range correlations",
          source: `${OKAMOTO_NOMURA} (dimerized); incommensurate beyond the disorder point J2 = J1/2, where the exact dimer state of ${MAJUMDAR_GHOSH} has no correlations beyond one bond (derivable from the dimer state; common statement, no source checked)`,
          gapless: false,
          validFor: ["two-magnon bound state", "one-magnon saturation field"],
        },
      ],
      atBoundary: [
        {
          name: "critical point J2c (marginal coupling vanishes)",
          source: OKAMOTO_NOMURA,
          gapless: true,
          validFor: ["two-magnon bound state", "one-magnon saturation field"],
          notes: ["At J2c the marginal coupling g vanishes, so the two-branch splitting Delta -> 0."],
        },
        {
          name: "Majumdar-Ghosh point (exact dimer ground state)",
          source: MAJUMDAR_GHOSH,
          gapless: false,
          validFor: ["Majumdar-Ghosh dimer state", "two-magnon bound state", "one-magnon saturation field"],
        },
      ],
      notes: [],
    };
  }
  // Ferro J1: parameter J2/|J1|. For J2 <= 0 every bond is ferromagnetic and the fully polarized
  // state minimizes each bond term separately (derivable), so it is the ground state.
  const value = j2 / Math.abs(j1);
  return {
    parameter: "J2/|J1|",
    value,
    boundaries: [
      {
        name: "ferromagnet to singlet transition",
        value: 0.25,
        source: `${HAMADA}; 1/4 is also where the one-magnon dispersion above the ferromagnet, |J1|(1 - cos k) + J2 (cos 2k - 1), turns soft at k = 0 (derivable)`,
        uncertainty: 0,
      },
    ],
    regions: [
      {
        name: "ferromagnetic ground state",
        source: value <= 0 ? "all bonds ferromagnetic: the polarized state minimizes every bond (derivable)" : HAMADA,
        gapless: true,
        validFor: ["two-magnon bound state"],
        notes: ["Quadratic ferromagnetic magnons: gapless (derivable from the one-magnon dispersion)."],
      },
      {
        name: "singlet ground state with incommensurate (spiral) correlations",
        source: HAMADA,
        gapless: null,
        validFor: ["two-magnon bound state"],
        notes: [
          "Whether a (tiny) gap opens here is not settled by the sources at hand; gapless is left unknown.",
          "Saturation: multi-magnon bound states can saturate before single magnons for ferro J1.",
        ],
      },
    ],
    atBoundary: [
      {
        name: "ferromagnet-singlet transition point",
        source: HAMADA,
        gapless: true,
        validFor: ["two-magnon bound state"],
        notes: ["The one-magnon dispersion is quartic in k here (derivable), so the ferromagnetic branch is gapless."],
      },
    ],
    notes: [],
  };
}

function xxzChainAxis(j: number, delta: number): RegionAxis {
  // For J < 0 a rotation by pi about z on every second site (bipartite chain) maps
  // J (SxSx + SySy + Delta SzSz) to |J| (SxSx + SySy - Delta SzSz): derivable.
  const value = j > 0 ? delta : -delta;
  const notes = j > 0 ? [] : ["J < 0 mapped to J > 0 with Delta -> -Delta by a sublattice rotation about z (derivable)."];
  return {
    parameter: "Delta",
    value,
    boundaries: [exact("ferromagnetic Heisenberg point", -1, BETHE_XXZ), exact("Heisenberg (SU(2)) point", 1, BETHE_XXZ)],
    regions: [
      {
        name: "ferromagnetic (Ising-like), gapped",
        source: `${BETHE_XXZ}; one-magnon gap J(|Delta| - 1) above the polarized state (derivable)`,
        gapless: false,
        validFor: ["Bethe ansatz", "two-magnon bound state"],
      },
      {
        name: "gapless (critical XXZ)",
        source: BETHE_XXZ,
        gapless: true,
        validFor: ["Bethe ansatz", "two-branch splitting", "two-magnon bound state"],
        notes: ["Two-branch splitting: U(1) about z only with the field along z."],
      },
      {
        name: "Neel ordered, gapped (Ising-like)",
        source: BETHE_XXZ,
        gapless: false,
        validFor: ["Bethe ansatz", "two-magnon bound state"],
      },
    ],
    atBoundary: [
      {
        name: "ferromagnetic Heisenberg point",
        source: `${BETHE_XXZ}; quadratic magnons above the polarized state (derivable)`,
        gapless: true,
        validFor: ["Bethe ansatz", "two-magnon bound state"],
      },
      {
        name: "Heisenberg antiferromagnet (SU(2) point)",
        source: BETHE_XXZ,
        gapless: true,
        validFor: ["Bethe ansatz", "two-branch splitting", "two-magnon bound state"],
      },
    ],
    notes,
  };
}

function spin1ChainAxis(j: number, d: number): RegionAxis {
  const value = d / j;
  return {
    parameter: "D/J",
    value,
    boundaries: [{ name: "Haldane to large-D transition", value: 0.9684713, source: SPIN1_DC, uncertainty: 1e-7 }],
    regions: [
      value >= 0
        ? {
            name: "Haldane (gapped)",
            source: `${SPIN1_DC}; gap 0.41048 J at D = 0 from ${WHITE_HUSE}`,
            gapless: false,
            validFor: [],
          }
        : {
            name: "Haldane, or Ising-like Neel for sufficiently negative D (boundary not given)",
            source: `${WHITE_HUSE} at D = 0; the negative-D boundary is not verified here`,
            gapless: null,
            validFor: [],
            notes: ["For D < 0 a Neel phase appears at a boundary this table does not give (unverified)."],
          },
      {
        name: "large-D (gapped, trivial)",
        source: SPIN1_DC,
        gapless: false,
        validFor: [],
      },
    ],
    atBoundary: [
      {
        name: "Haldane to large-D critical point",
        source: `${SPIN1_DC}; a continuous transition between gapped phases closes the gap (common statement, no source)`,
        gapless: true,
        validFor: [],
      },
    ],
    notes: [],
  };
}

/** A fuzzy edge of a debated quantum range: the published edge lies somewhere in [lo, hi]. */
interface FuzzyEdge {
  readonly lo: number;
  readonly hi: number;
}
interface QuantumRange {
  readonly name: string;
  readonly gapless: boolean | null;
  readonly ordered: boolean;
}

function quantumPicture(edges: readonly FuzzyEdge[], ranges: readonly QuantumRange[]) {
  return (value: number): QuantumPicture & { readonly gapless: boolean | null; readonly ordered: boolean } => {
    for (let k = 0; k < edges.length; k++) {
      const edge = edges[k]!;
      const below = ranges[k]!;
      const above = ranges[k + 1]!;
      if (value < edge.lo) return { ...below, uncertain: false, source: NOTES_2D };
      if (value <= edge.hi) {
        return {
          name: `${below.name} or ${above.name} (edge uncertain)`,
          uncertain: true,
          gapless: null,
          ordered: false,
          source: NOTES_2D,
        };
      }
    }
    const last = ranges[ranges.length - 1]!;
    return { ...last, uncertain: false, source: NOTES_2D };
  };
}

// Ordered Heisenberg phases break SU(2) and carry gapless Goldstone magnons (common practice, no
// source); non-magnetic windows are left unknown (debated).
const NEEL_Q: QuantumRange = { name: "Neel order (quantum)", gapless: true, ordered: true };
const STRIPE_Q: QuantumRange = { name: "stripe order (quantum)", gapless: true, ordered: true };
const NONMAG_Q: QuantumRange = { name: "non-magnetic window", gapless: null, ordered: false };

function twoDimensionalAxis(kind: "square-j1j2" | "triangular-j1j2" | "honeycomb-j1j2", j1: number, j2: number): RegionAxis {
  const value = j2 / j1;
  const classical = (name: string, validFor: Validity[] = []): RegionInfo => ({ name, source: LUTTINGER_TISZA, gapless: null, validFor });
  switch (kind) {
    case "square-j1j2":
      return {
        parameter: "J2/J1",
        value,
        boundaries: [exact("classical Neel to stripe", 0.5, `${LUTTINGER_TISZA}: E(pi,pi) = -2J1 + 2J2 equals E(pi,0) = -2J2 per S^2`)],
        regions: [classical("Neel (classical)"), classical("stripe (classical)")],
        atBoundary: [classical("classical Neel-stripe degeneracy point")],
        notes: [],
        quantum: quantumPicture(
          [
            { lo: 0.4, hi: 0.45 },
            { lo: 0.6, hi: 0.6 },
          ],
          [NEEL_Q, NONMAG_Q, STRIPE_Q],
        ),
      };
    case "triangular-j1j2":
      return {
        parameter: "J2/J1",
        value,
        boundaries: [exact("classical 120-degree to stripe", 0.125, `${LUTTINGER_TISZA}: J(K) = -3J1 + 6J2 equals J(M) = -2J1 - 2J2`)],
        regions: [classical("120-degree (classical)"), classical("stripe (classical)")],
        atBoundary: [classical("classical 120-degree-stripe degeneracy point")],
        notes: [],
        quantum: quantumPicture(
          [
            { lo: 0.06, hi: 0.08 },
            { lo: 0.15, hi: 0.15 },
          ],
          [{ name: "120-degree order (quantum)", gapless: true, ordered: true }, { name: "spin-liquid window", gapless: null, ordered: false }, STRIPE_Q],
        ),
      };
    case "honeycomb-j1j2":
      return {
        parameter: "J2/J1",
        value,
        boundaries: [exact("classical Neel instability", 1 / 6, `${LUTTINGER_TISZA}: lowest band J2 f(q) - J1 sqrt(3 + f(q)) stops being minimal at q = 0`)],
        regions: [classical("Neel (classical)"), classical("spiral (classical)")],
        atBoundary: [classical("classical Neel instability point")],
        notes: [],
        quantum: quantumPicture([{ lo: 0.2, hi: 0.2 }], [NEEL_Q, NONMAG_Q]),
      };
  }
}

function kagomeAxis(j1: number): RegionAxis {
  const af = j1 > 0;
  return {
    parameter: "J1",
    value: j1,
    boundaries: [],
    regions: [
      af
        ? {
            name: "classically extensively degenerate; no magnetic order (quantum)",
            source: NOTES_2D,
            gapless: null,
            validFor: [],
            notes: ["Gapped versus gapless spin liquid is debated; gapless is left unknown."],
          }
        : {
            name: "ferromagnetic ground state",
            source: "all bonds ferromagnetic: the polarized state minimizes every bond (derivable)",
            gapless: true,
            validFor: ["spin-wave theory"],
          },
    ],
    atBoundary: [],
    notes: [],
  };
}

function axisFor(family: FamilyInput): RegionAxis | { readonly unsupported: string; readonly parameter: RegionParameter; readonly value: number } {
  const finite = (...xs: number[]): boolean => xs.every(Number.isFinite);
  switch (family.kind) {
    case "j1j2-chain":
      if (!finite(family.j1, family.j2)) throw new RangeError("j1j2-chain: couplings must be finite");
      if (family.j1 === 0) return { unsupported: "J1 = 0: two decoupled J2 chains, outside this table", parameter: "J2/J1", value: Number.POSITIVE_INFINITY };
      return j1j2ChainAxis(family.j1, family.j2);
    case "xxz-chain":
      if (!finite(family.j, family.delta)) throw new RangeError("xxz-chain: J and Delta must be finite");
      if (family.j === 0) return { unsupported: "J = 0: no exchange", parameter: "Delta", value: family.delta };
      return xxzChainAxis(family.j, family.delta);
    case "spin1-chain-single-ion":
      if (!finite(family.j, family.d)) throw new RangeError("spin1-chain-single-ion: J and D must be finite");
      if (!(family.j > 0)) return { unsupported: "J <= 0: only the antiferromagnetic spin-1 chain is tabulated", parameter: "D/J", value: family.d / family.j };
      return spin1ChainAxis(family.j, family.d);
    case "square-j1j2":
    case "triangular-j1j2":
    case "honeycomb-j1j2":
      if (!finite(family.j1, family.j2)) throw new RangeError(`${family.kind}: couplings must be finite`);
      if (!(family.j1 > 0)) return { unsupported: "J1 <= 0: only antiferromagnetic J1 is tabulated", parameter: "J2/J1", value: family.j2 / family.j1 };
      return twoDimensionalAxis(family.kind, family.j1, family.j2);
    case "kagome-j1":
      if (!finite(family.j1) || family.j1 === 0) throw new RangeError("kagome-j1: J1 must be finite and non-zero");
      return kagomeAxis(family.j1);
  }
}

function boundaryTolerance(b: RegionBoundary): number {
  return Math.max(b.uncertainty, 1e-9 * Math.max(1, Math.abs(b.value)));
}

/** Signed relative distance (value - b)/|b|, or value - b for b = 0. */
export function relativeDistance(value: number, boundaryValue: number): number {
  return boundaryValue === 0 ? value - boundaryValue : (value - boundaryValue) / Math.abs(boundaryValue);
}

export interface NearestBoundary {
  readonly boundary: RegionBoundary;
  readonly distance: number;
  readonly side: "below" | "on" | "above";
}

function nearestOnAxis(axis: RegionAxis): NearestBoundary | null {
  if (!Number.isFinite(axis.value)) return null;
  let best: RegionBoundary | null = null;
  for (const b of axis.boundaries) {
    if (best === null || Math.abs(axis.value - b.value) < Math.abs(axis.value - best.value)) best = b;
  }
  if (!best) return null;
  const on = Math.abs(axis.value - best.value) <= boundaryTolerance(best);
  return {
    boundary: best,
    distance: relativeDistance(axis.value, best.value),
    side: on ? "on" : axis.value < best.value ? "below" : "above",
  };
}

/** Nearest boundary of the family's region table (by absolute difference in the parameter). */
export function nearestBoundary(family: FamilyInput): NearestBoundary | null {
  const axis = axisFor(family);
  return "unsupported" in axis ? null : nearestOnAxis(axis);
}

/** Places a parameter set of a known family in its region table. */
export function placeInRegion(family: FamilyInput): RegionPlacement {
  const axis = axisFor(family);
  if ("unsupported" in axis) {
    return {
      family: family.kind,
      name: "outside the region table",
      parameter: axis.parameter,
      value: axis.value,
      boundary: null,
      distance: null,
      onBoundary: false,
      source: "none",
      gapless: null,
      validFor: [],
      notes: [axis.unsupported],
    };
  }
  const near = nearestOnAxis(axis);
  let info: RegionInfo;
  const onIndex = axis.boundaries.findIndex((b) => Math.abs(axis.value - b.value) <= boundaryTolerance(b));
  if (onIndex >= 0) {
    info = axis.atBoundary[onIndex]!;
  } else {
    const below = axis.boundaries.filter((b) => b.value < axis.value).length;
    info = axis.regions[below]!;
  }
  const notes = [...axis.notes, ...(info.notes ?? [])];
  let gapless = info.gapless;
  let validFor = info.validFor;
  let quantum: QuantumPicture | undefined;
  if (axis.quantum) {
    const q = axis.quantum(axis.value);
    quantum = { name: q.name, uncertain: q.uncertain, source: q.source };
    gapless = q.gapless;
    if (q.ordered) validFor = [...validFor, "spin-wave theory"];
  }
  return {
    family: family.kind,
    name: info.name,
    parameter: axis.parameter,
    value: axis.value,
    boundary: near?.boundary ?? null,
    distance: near?.distance ?? null,
    onBoundary: near?.side === "on",
    source: info.source,
    gapless,
    validFor,
    ...(quantum ? { quantum } : {}),
    notes,
  };
}
