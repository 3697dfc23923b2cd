// Exact finite-ring calibration of the chain predictions: sector energies (for m(h) by level
// crossings), the velocity, and the splitting Delta(m) from the spin-current pole at q = 0, all
// from the exact solver on an N-site ring of the symmetric chain (DM removed: the doublet uses
// the symmetric chain's branches). Heavy: run it off the editor's main thread. Analysis layer.
import { solveExact, type ExactHooks } from "../physics/ed/solve";
import type { ClusterBond, SpinCluster } from "../physics/types";
import type { ChainCouplings, ExactCalibration } from "./predictions";

/** Largest m for which splittings are computed (beyond it the two-branch picture is not used). */
const CALIBRATION_MAX_M = 0.4;

/** The symmetric chain (about z = the field axis) on a periodic ring of N sites, meV. */
export function ringCluster(c: ChainCouplings, sites: number, fieldMeV = 0): SpinCluster {
  const bonds: ClusterBond[] = [];
  for (const b of c.bonds) {
    const jp = b.jPerp * c.jMeV;
    const jz = b.jZ * c.jMeV;
    for (let i = 0; i < sites; i++) {
      bonds.push({
        i,
        j: (i + b.offset) % sites,
        matrix: [
          [jp, 0, 0],
          [0, jp, 0],
          [0, 0, jz],
        ],
      });
    }
  }
  return {
    spins: new Array<number>(sites).fill(0.5),
    positions: Array.from({ length: sites }, (_, i) => [i, 0, 0] as const),
    bonds,
    singleIon: [],
    fields: Array.from({ length: sites }, () => [0, 0, fieldMeV] as const),
    translations: [Array.from({ length: sites }, (_, i) => (i + 1) % sites)],
    translationVectors: [[1, 0, 0]],
    translationPeriods: [sites],
  };
}

export function calibrateChain(c: ChainCouplings, sites: number, hooks: ExactHooks = {}): ExactCalibration {
  const z = [0, 0, 1] as const;
  const progress = (base: number, span: number): ExactHooks => ({
    ...(hooks.signal ? { signal: hooks.signal } : {}),
    onProgress: (f, stage) => hooks.onProgress?.(base + span * f, stage),
  });
  const zeroField = solveExact(ringCluster(c, sites), { conservedAxis: z, sz: "all", correlators: false, velocity: true }, progress(0, 0.4));
  const energies: number[] = [];
  for (const s of zeroField.sectors) {
    if (s.sz === null || s.sz < 0) continue;
    const idx = Math.round(s.sz);
    energies[idx] = Math.min(energies[idx] ?? Infinity, s.lowestEnergyMeV);
  }
  // Velocity from the lowest zero-field level at k0 + 2 pi/N in the ground state's S^z sector
  // (the des Cloizeaux-Pearson branch for the Heisenberg chain; finite-size corrections are of
  // order 1/N^2, with logarithms at the isotropic point).
  let velocityMeV: number | null = null;
  const sz0 = zeroField.sectors.filter((s) => s.sz === 0 && s.kIndex !== null);
  const ground = sz0.reduce<(typeof sz0)[number] | null>((best, s) => (!best || s.lowestEnergyMeV < best.lowestEnergyMeV ? s : best), null);
  if (ground && ground.kIndex !== null) {
    const n1 = (ground.kIndex + 1) % sites;
    const next = sz0.find((s) => s.kIndex === n1 || s.kIndex === (sites - n1) % sites);
    if (next) velocityMeV = (next.lowestEnergyMeV - ground.lowestEnergyMeV) / ((2 * Math.PI) / sites);
  }
  const top = Math.floor(sites / 2);
  const splittings: { m: number; splittingMeV: number; method: string }[] = [];
  const targets: number[] = [];
  for (let sz = 1; sz < top && sz / sites <= CALIBRATION_MAX_M; sz++) targets.push(sz);
  targets.forEach((sz, k) => {
    const below = (energies[sz] ?? NaN) - (energies[sz - 1] ?? NaN);
    const above = (energies[sz + 1] ?? NaN) - (energies[sz] ?? NaN);
    // The sector is a ground state for fields between the two level crossings; skip it if that
    // plateau is empty (it can be for frustrated chains).
    if (!(above > below)) return;
    const h = (below + above) / 2;
    const r = solveExact(
      ringCluster(c, sites, h),
      { conservedAxis: z, sz: [sz], correlators: { q: [0], components: ["current-"] }, velocity: false },
      progress(0.4 + (0.6 * k) / targets.length, 0.6 / targets.length),
    );
    const d = r.splittingMeV.fromCurrent;
    if (d !== null && Number.isFinite(d)) splittings.push({ m: sz / sites, splittingMeV: d, method: "spin-current pole at q = 0" });
  });
  return {
    sites,
    sectorEnergiesMeV: energies,
    splittings,
    velocityMeV,
    method: `exact diagonalization (Lanczos) on a ${sites}-site periodic ring`,
  };
}
