// Benchmark of the analytic and semi-analytic field-dependent predictions (physics layer: bethe.ts,
// magnons.ts, branches.ts): timings against their targets and one full set of chain predictions.
// Benchmarks layer: returns lines to print, asserts nothing. Energies in units of J.
import { branchCurve, dmDoublet, fieldTheorySplitting, twoBranches } from "../server/src/physics/branches";
import {
  xxzDressedVelocity,
  xxzMagnetization,
  xxzSaturationField,
  xxzSusceptibility,
  xxzVelocity,
} from "../server/src/physics/bethe";
import {
  nearSaturationBranch,
  saturationFieldWithBoundStates,
  twoMagnonSpectrum,
  type ChainBond,
} from "../server/src/physics/magnons";

/** Mean wall time per call in ms over `repeats` calls, after one warm-up call. */
function timeMs<T>(repeats: number, run: (i: number) => T): { ms: number; last: T } {
  let last = run(0);
  const start = performance.now();
  for (let i = 0; i < repeats; i++) last = run(i);
  return { ms: (performance.now() - start) / repeats, last };
}

const fmt = (x: number, digits = 6) => (Number.isFinite(x) ? x.toPrecision(digits) : String(x));

export function benchPredictions(): string[] {
  const lines: string[] = [];
  lines.push("== Bethe ansatz m(h), XXZ chain (target < 5 ms per field) ==");
  for (const delta of [1, 0.5, -0.5]) {
    for (const ratio of [0.005, 0.05, 0.25, 0.5, 0.75, 0.95]) {
      const h = ratio * xxzSaturationField(delta);
      // Tiny field offsets per repeat keep any caching from hiding the cost.
      const { ms, last } = timeMs(10, (i) => xxzMagnetization(delta, h * (1 + 1e-9 * i)));
      const status = ms < 5 ? "ok" : "SLOW";
      lines.push(
        `Delta=${delta} h=${fmt(h, 4)} m=${fmt(last.m, 10)} orders differ by ${last.quadratureDifference.toExponential(1)}` +
          ` nodes=${last.nodeCount}  ${ms.toFixed(2)} ms  [${status}]`,
      );
    }
  }

  lines.push("== Two-magnon problem on a 400-site ring (target < 20 ms) ==");
  const heisenberg: ChainBond[] = [{ offset: 1, jPerp: 1, jZ: 1 }];
  const j1j2: ChainBond[] = [
    { offset: 1, jPerp: 1, jZ: 1 },
    { offset: 2, jPerp: 0.3, jZ: 0.3 },
  ];
  const longRange: ChainBond[] = [
    { offset: 1, jPerp: 1, jZ: 0.9 },
    { offset: 2, jPerp: 0.2, jZ: 0.25 },
    { offset: 3, jPerp: 0.1, jZ: 0.05 },
  ];
  for (const [name, bonds] of [
    ["Heisenberg", heisenberg],
    ["J1-J2 (J2 = 0.3)", j1j2],
    ["range-3 XXZ", longRange],
  ] as const) {
    const { ms, last } = timeMs(10, (i) => twoMagnonSpectrum(bonds, 0.7 * Math.PI + (2 * Math.PI * i) / 400, 400));
    const bound = last.outside.map((s) => `${fmt(s.energy)} (${s.side}, <r>=${fmt(s.meanSeparation, 3)})`).join(", ");
    lines.push(`${name}: ${last.energies.length} states, bound: ${bound || "none"}  ${ms.toFixed(2)} ms  [${ms < 20 ? "ok" : "SLOW"}]`);
  }

  lines.push("== Predictions for the Heisenberg chain (J = 1) ==");
  const h = 0.1;
  const magnetization = xxzMagnetization(1, h);
  const m = magnetization.m;
  const v0 = xxzVelocity(1);
  const vm = xxzDressedVelocity(1, m);
  const chi = xxzSusceptibility(1, h);
  lines.push(`h=${h}: m=${fmt(m, 10)} (${magnetization.method}), chi=${fmt(chi.chi)} (pi^2 chi=${fmt(Math.PI ** 2 * chi.chi)})`);
  lines.push(`velocity: zero field ${fmt(v0)}, dressed at m ${fmt(vm)}, at m = 1/4 ${fmt(xxzDressedVelocity(1, 0.25))}`);
  const estimate = fieldTheorySplitting(h, v0, m);
  lines.push(`leading-order splitting Delta=${fmt(estimate.splitting)} g=${fmt(estimate.g)} valid=${estimate.valid}`);
  const qSmall = 0.02;
  const branches = twoBranches(h, vm, estimate.splitting, qSmall, m);
  lines.push(
    `two branches at q=${qSmall}: lower ${fmt(branches.lower.energy)} (weight ${fmt(branches.lower.weight ?? NaN)}),` +
      ` upper ${fmt(branches.upper.energy)} (weight ${fmt(branches.upper.weight ?? NaN)})`,
  );
  const curve = branchCurve(h, vm, estimate.splitting, m, [0, qSmall, 2 * qSmall]);
  lines.push(`branch curve q=0,${qSmall},${2 * qSmall}: lower ${curve.lowerEnergy.map((x) => fmt(x, 4)).join(" ")}; upper ${curve.upperEnergy.map((x) => fmt(x, 4)).join(" ")}`);
  const dm = dmDoublet(h, vm, estimate.splitting, 0.05, 1, m);
  lines.push(
    `DM doublet (D = 0.05): ${fmt(dm.lower.energy)} / ${fmt(dm.upper.energy)} vs naive ${fmt(dm.naive.lower)} / ${fmt(dm.naive.upper)};` +
      ` ratio Delta/(v theta)=${fmt(dm.splittingRatio, 3)} naive applies: ${dm.naiveApplies}`,
  );
  const saturation = timeMs(1, () => saturationFieldWithBoundStates(heisenberg));
  lines.push(
    `saturation: h_sat=${fmt(saturation.last.hSat)} via ${saturation.last.mechanism} at k=${fmt(saturation.last.k)}` +
      ` (${saturation.ms.toFixed(0)} ms; ${saturation.last.note})`,
  );
  const frustrated = timeMs(1, () => saturationFieldWithBoundStates([
    { offset: 1, jPerp: -1, jZ: -1 },
    { offset: 2, jPerp: 0.4, jZ: 0.4 },
  ]));
  lines.push(
    `ferro J1 = -1, J2 = 0.4: h_sat=${fmt(frustrated.last.hSat)} via ${frustrated.last.mechanism} at K=${fmt(frustrated.last.k)}` +
      ` (one-magnon ${fmt(frustrated.last.oneMagnonField)}; ${frustrated.ms.toFixed(0)} ms)`,
  );
  const near = timeMs(1, () => nearSaturationBranch(heisenberg, 1.9, [0, (2 * Math.PI) / 40, (4 * Math.PI) / 40], 400));
  lines.push(
    `near saturation (h = 1.9): upper branch ${near.last.points.map((p) => `q=${fmt(p.q, 3)}: ${p.energy === null ? "none" : fmt(p.energy)} (overlap ${fmt(p.pairOverlapFactor ?? NaN, 3)})`).join("; ")}` +
      ` (${near.ms.toFixed(1)} ms)`,
  );
  return lines;
}
