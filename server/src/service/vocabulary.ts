// The words of the .spw format with one-line explanations: statements, exchange kinds with their
// signatures, conventions, symmetry claims and units. Shared by hover, completion and signature
// help so that the three always say the same. Service layer.
import { unitInfo } from "../model/units";

export interface StatementWord {
  readonly word: string;
  readonly summary: string;
  /** A snippet in VS Code snippet syntax for completion. */
  readonly snippet: string;
}

export const STATEMENT_WORDS: readonly StatementWord[] = [
  { word: "spin", summary: "Spin length of every site (`spin 1/2`), or of one site (`spin Cu = 1`).", snippet: "spin ${1:1/2}" },
  {
    word: "convention",
    summary: "Sign convention: `antiferro-positive` (H = +J S_i.S_j, J > 0 antiferromagnetic) or `ferro-positive` (H = -J S_i.S_j).",
    snippet: "convention ${1|antiferro-positive,ferro-positive|}",
  },
  { word: "lattice", summary: "A preset (`lattice chain sites Cu`) or a custom lattice `{ vector ... site ... }`.", snippet: "lattice ${1:chain}" },
  { word: "let", summary: "Defines a parameter: `let J1 = 14.2 K`. Values carry units; expressions may use other parameters.", snippet: "let ${1:J} = ${2:1} ${3:meV}" },
  {
    word: "exchange",
    summary: "An exchange term on bonds: `exchange heisenberg(J1) on Cu -> Cu + (1)` or `on shell 1`. Each bond is counted once.",
    snippet: "exchange ${1:heisenberg}(${2:J}) on ${3:shell 1}",
  },
  { word: "anisotropy", summary: "Single-ion anisotropy D (S^z)^2 + E ((S^x)^2 - (S^y)^2) about an axis: `anisotropy Ni D = 2 K axis (0, 0, 1)`.", snippet: "anisotropy ${1:all} D = ${2:1 K}" },
  { word: "g", summary: "The g-tensor of a site: a number, (gx, gy, gz) or a 3x3 matrix. Default 2.", snippet: "g ${1:all} = ${2:2}" },
  { word: "field", summary: "The magnetic field: `field 3 T along (0, 0, 1)`, optionally `sweep 0 T to 10 T steps 20`.", snippet: "field ${1:1} T along (${2:0, 0, 1})" },
  { word: "cluster", summary: "Finite cluster for exact checks, in unit cells: `cluster 20 periodic` or `cluster (4, 4) open`.", snippet: "cluster ${1:16} ${2|periodic,open|}" },
  { word: "probe", summary: "Probe frequency or energy of the experiment, e.g. the ESR frequency `probe 240 GHz`.", snippet: "probe ${1:240} GHz" },
  { word: "expect", summary: "The symmetry the author relies on: `expect su2`, `expect u1 about (0, 0, 1)` or `expect none`; checked against the model.", snippet: "expect ${1|su2,u1 about (0\\, 0\\, 1),none|}" },
];

export const CLAUSE_WORDS: Readonly<Record<string, string>> = {
  model: 'The model block: `model "name" { ... }`. A file holds one.',
  sites: "Names the sites of a preset lattice in order: `lattice ladder sites A, B`.",
  vector: "A primitive lattice vector of a custom lattice: `vector a1 = (1, 0, 0)`.",
  site: "A site of a custom lattice at a position in Cartesian lattice units: `site A = (0, 0, 0)`.",
  on: "The bonds of an exchange term follow: `on Cu -> Cu + (1)` or `on shell 1`.",
  shell: "All bonds of one neighbour shell (1 = nearest), found by distance.",
  axis: "The axis of a single-ion term (default (0, 0, 1)).",
  along: "Direction of the field (normalised; default (0, 0, 1)).",
  sweep: "A field sweep: `sweep 0 T to 10 T steps 20`.",
  to: "End of a field sweep.",
  steps: "Number of field values in a sweep (2 to 2000).",
  about: "The axis of a U(1) symmetry claim.",
  all: "Every site of the lattice.",
  periodic: "Periodic boundary conditions for the cluster.",
  open: "Open boundary conditions for the cluster.",
};

export interface KindSignature {
  readonly label: string;
  readonly parameters: readonly { readonly label: string; readonly documentation: string }[];
  readonly documentation: string;
}

/** Signatures of the exchange kinds (the model layer's `exchangeMatrix` accepts exactly these). */
export const KIND_SIGNATURES: Readonly<Record<string, readonly KindSignature[]>> = {
  heisenberg: [
    {
      label: "heisenberg(J)",
      parameters: [{ label: "J", documentation: "Isotropic coupling, an energy: J S_i.S_j." }],
      documentation: "Isotropic (Heisenberg) exchange, matrix J times the identity.",
    },
  ],
  xxz: [
    {
      label: "xxz(J, delta)",
      parameters: [
        { label: "J", documentation: "In-plane coupling, an energy." },
        { label: "delta", documentation: "Anisotropy, a pure number: the coupling along the axis is J delta." },
      ],
      documentation: "XXZ exchange about z: diag(J, J, J delta).",
    },
    {
      label: "xxz(J, delta, axis)",
      parameters: [
        { label: "J", documentation: "In-plane coupling, an energy." },
        { label: "delta", documentation: "Anisotropy, a pure number." },
        { label: "axis", documentation: "The symmetry axis n, a vector (x, y, z): J (1 - n n^T) + J delta n n^T." },
      ],
      documentation: "XXZ exchange about an axis n.",
    },
  ],
  xyz: [
    {
      label: "xyz(Jx, Jy, Jz)",
      parameters: [
        { label: "Jx", documentation: "Coupling of S^x S^x, an energy." },
        { label: "Jy", documentation: "Coupling of S^y S^y, an energy." },
        { label: "Jz", documentation: "Coupling of S^z S^z, an energy." },
      ],
      documentation: "Fully anisotropic diagonal exchange diag(Jx, Jy, Jz).",
    },
  ],
  dm: [
    {
      label: "dm(D, (x, y, z))",
      parameters: [
        { label: "D", documentation: "Strength |D|, an energy." },
        { label: "(x, y, z)", documentation: "Direction of the DM vector (normalised)." },
      ],
      documentation: "Dzyaloshinskii-Moriya interaction D . (S_i x S_j) with D along the given direction.",
    },
  ],
  matrix: [
    {
      label: "matrix([[Jxx, Jxy, Jxz], [Jyx, Jyy, Jyz], [Jzx, Jzy, Jzz]])",
      parameters: [{ label: "[[Jxx, Jxy, Jxz], [Jyx, Jyy, Jyz], [Jzx, Jzy, Jzz]]", documentation: "A 3x3 matrix of energies: S_i . J . S_j." }],
      documentation: "A general exchange matrix with units on its entries.",
    },
    {
      label: "matrix(J, [[...]])",
      parameters: [
        { label: "J", documentation: "An energy scale." },
        { label: "[[...]]", documentation: "A 3x3 matrix of pure numbers, multiplied by J." },
      ],
      documentation: "A general exchange matrix: an energy times a pure-number matrix.",
    },
  ],
};

export const KIND_SNIPPETS: Readonly<Record<string, string>> = {
  heisenberg: "heisenberg(${1:J})",
  xxz: "xxz(${1:J}, ${2:delta})",
  xyz: "xyz(${1:Jx}, ${2:Jy}, ${3:Jz})",
  dm: "dm(${1:D}, (${2:0, 0, 1}))",
  matrix: "matrix(${1:J}, [[${2:1, 0, 0}], [${3:0, 1, 0}], [${4:0, 0, 1}]])",
};

export const CONVENTIONS: Readonly<Record<string, string>> = {
  "antiferro-positive": "H = +J S_i.S_j: J > 0 is antiferromagnetic (the default when none is given).",
  "ferro-positive": "H = -J S_i.S_j: J > 0 is ferromagnetic.",
};

export const SYMMETRY_CLAIMS: Readonly<Record<string, string>> = {
  su2: "Full spin-rotation symmetry: isotropic exchange, trivial single-ion terms, uniform g.",
  u1: "Rotation symmetry about one axis: write `expect u1 about (x, y, z)`.",
  none: "No spin-rotation symmetry is claimed.",
};

/** What a unit means, for hovers and completion details. */
export function unitDescription(key: string): string | null {
  const u = unitInfo(key);
  if (!u) return null;
  if (u.dimension === "field") return `${u.label}: magnetic field, 1 ${u.label} = ${u.toCanonical} T`;
  const meaning: Record<string, string> = {
    K: "temperature as energy kB T",
    mK: "temperature as energy kB T",
    MHz: "frequency as energy h nu",
    GHz: "frequency as energy h nu",
    THz: "frequency as energy h nu",
    "cm^-1": "wavenumber as energy h c / lambda",
  };
  const what = meaning[key] ? `energy (${meaning[key]})` : "energy";
  return `${u.label}: ${what}, 1 ${u.label} = ${Number(u.toCanonical.toPrecision(7))} meV`;
}
