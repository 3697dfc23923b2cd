// Units and physical constants for .spw quantities. Canonical units: energy in meV, magnetic field
// in T, frequency in GHz. Constants come from a private, locked-down mathjs instance (its
// physical constants are CODATA 2018: Tiesinga et al., Rev. Mod. Phys. 93, 025010 (2021)).
// Model layer.
import { bohrMagnetonDependencies, boltzmannDependencies, create, elementaryChargeDependencies, planckConstantDependencies, speedOfLightDependencies } from "mathjs";

/**
 * A private mathjs instance with the five constants read below and what they need (units,
 * numbers): not the whole library, whose hundreds of functions cost the language server tens of
 * MiB and the bundle most of its size. User text never reaches it (expressions are parsed by our
 * own grammar); it is still locked down so that nothing can extend it at run time.
 */
const factories = { bohrMagnetonDependencies, boltzmannDependencies, elementaryChargeDependencies, planckConstantDependencies, speedOfLightDependencies };
const math = create(factories as Record<string, NonNullable<(typeof factories)[keyof typeof factories]>>, {}) as unknown as Record<string, unknown>;
const lockedFunctions = ["import", "createUnit", "evaluate", "parse", "compile", "simplify", "derivative", "resolve", "reviver", "replacer"];
{
  const disabled: Record<string, () => never> = {};
  for (const name of lockedFunctions) {
    disabled[name] = () => {
      throw new Error(`mathjs function ${name} is disabled in Spinwright`);
    };
  }
  (math as unknown as { import: (o: object, opts: object) => void }).import(disabled, { override: true });
}

function si(quantity: unknown, unit: string): number {
  return (quantity as { toNumber(u: string): number }).toNumber(unit);
}

/** CODATA 2018 constants in SI, read from mathjs. */
export const CODATA_2018 = {
  /** Elementary charge, C (exact). */
  elementaryCharge: si(math.elementaryCharge, "C"),
  /** Boltzmann constant, J/K (exact). */
  boltzmann: si(math.boltzmann, "J / K"),
  /** Planck constant, J s (exact). */
  planck: si(math.planckConstant, "J s"),
  /** Speed of light, m/s (exact). */
  speedOfLight: si(math.speedOfLight, "m / s"),
  /** Bohr magneton, J/T. */
  bohrMagneton: si(math.bohrMagneton, "J / T"),
} as const;

const MEV_IN_J = CODATA_2018.elementaryCharge * 1e-3;

/** One kelvin (times kB) in meV. */
export const MEV_PER_K = CODATA_2018.boltzmann / MEV_IN_J;
/** One GHz (times h) in meV. */
export const MEV_PER_GHZ = (CODATA_2018.planck * 1e9) / MEV_IN_J;
/** One cm^-1 (times h c) in meV. */
export const MEV_PER_CM = (CODATA_2018.planck * CODATA_2018.speedOfLight * 100) / MEV_IN_J;
/** The Bohr magneton in meV/T. */
export const MU_B_MEV_PER_T = CODATA_2018.bohrMagneton / MEV_IN_J;

export type Dimension = "energy" | "field" | "dimensionless";

export interface UnitInfo {
  readonly dimension: "energy" | "field";
  /** Value of one unit in the canonical unit of its dimension (meV or T). */
  readonly toCanonical: number;
  readonly label: string;
}

/**
 * Units a number may carry. Energies are the trade's: temperature, frequency and wavenumber
 * stand for kB T, h nu and h c / lambda (common practice, no source).
 */
export const UNITS: Readonly<Record<string, UnitInfo>> = {
  meV: { dimension: "energy", toCanonical: 1, label: "meV" },
  ueV: { dimension: "energy", toCanonical: 1e-3, label: "µeV" },
  eV: { dimension: "energy", toCanonical: 1e3, label: "eV" },
  // The SI joule is spelled out: J names exchange constants everywhere (common practice).
  joule: { dimension: "energy", toCanonical: 1 / MEV_IN_J, label: "J" },
  K: { dimension: "energy", toCanonical: MEV_PER_K, label: "K" },
  mK: { dimension: "energy", toCanonical: MEV_PER_K * 1e-3, label: "mK" },
  MHz: { dimension: "energy", toCanonical: MEV_PER_GHZ * 1e-3, label: "MHz" },
  GHz: { dimension: "energy", toCanonical: MEV_PER_GHZ, label: "GHz" },
  THz: { dimension: "energy", toCanonical: MEV_PER_GHZ * 1e3, label: "THz" },
  "cm^-1": { dimension: "energy", toCanonical: MEV_PER_CM, label: "cm^-1" },
  T: { dimension: "field", toCanonical: 1, label: "T" },
  mT: { dimension: "field", toCanonical: 1e-3, label: "mT" },
  G: { dimension: "field", toCanonical: 1e-4, label: "G" },
};

/** Unit key for a name and power as written (`cm` with power -1 is `cm^-1`). */
export function unitKey(name: string, power: number): string {
  return power === 1 ? name : `${name}^${power}`;
}

export const ENERGY_UNIT_NAMES = Object.entries(UNITS)
  .filter(([, u]) => u.dimension === "energy")
  .map(([k]) => k);
export const FIELD_UNIT_NAMES = Object.entries(UNITS)
  .filter(([, u]) => u.dimension === "field")
  .map(([k]) => k);

/** Units spelt out in words (any letter case, singular or plural), to the symbols .spw takes. */
const SPELT_OUT: Readonly<Record<string, string>> = {
  kelvin: "K",
  millikelvin: "mK",
  tesla: "T",
  millitesla: "mT",
  gauss: "G",
  electronvolt: "eV",
  millielectronvolt: "meV",
  microelectronvolt: "ueV",
  megahertz: "MHz",
  gigahertz: "GHz",
  terahertz: "THz",
};

/** The symbol of a unit written out in words (`kelvin` -> K, `Tesla` -> T), if it is one. */
export function unitSymbolForWord(word: string): string | undefined {
  const w = word.toLowerCase();
  return SPELT_OUT[w] ?? (w.endsWith("s") ? SPELT_OUT[w.slice(0, -1)] : undefined);
}

/** Names that denote units and so cannot name parameters. */
export const UNIT_WORDS = new Set(["meV", "ueV", "eV", "joule", "K", "mK", "MHz", "GHz", "THz", "cm", "T", "mT", "G"]);

/** Converts an energy in meV to the given energy unit. */
export function energyFromMeV(valueMeV: number, unit: string): number {
  const u = UNIT_MAP.get(unit);
  if (!u || u.dimension !== "energy") throw new Error(`not an energy unit: ${unit}`);
  return valueMeV / u.toCanonical;
}

/** Named constants an expression may use. */
export const CONSTANTS: Readonly<Record<string, { value: number; energy: number; field: number; label: string }>> = {
  pi: { value: Math.PI, energy: 0, field: 0, label: "π" },
  muB: { value: MU_B_MEV_PER_T, energy: 1, field: -1, label: "Bohr magneton (meV/T, CODATA 2018)" },
};

const UNIT_MAP = new Map(Object.entries(UNITS));
const CONSTANT_MAP = new Map(Object.entries(CONSTANTS));

/**
 * The unit with this key, if any. A Map, not a property lookup: a name typed in a file such as
 * `constructor` must not find an Object.prototype member, and lookups by text cut from a file
 * stay fast.
 */
export function unitInfo(key: string): UnitInfo | undefined {
  return UNIT_MAP.get(key);
}

/** The built-in constant with this name, if any (see unitInfo for why a Map). */
export function constantNamed(name: string): (typeof CONSTANTS)[string] | undefined {
  return CONSTANT_MAP.get(name);
}
