// Exact-diagonalization benchmark: J1-J2 rings (J2 = 0.24) in the S^z = 2 sector, ground state
// plus S^-+ at three momenta (q = 0, 2pi/N, 4pi/N), kernel throughput against a plain
// Float64Array copy of the same size, and peak RSS. Prints figures only (no assertions).
import { Basis, ConfigSpace } from "../server/src/physics/ed/basis";
import { compileModel } from "../server/src/physics/ed/model";
import { Sector, SectorHamiltonian } from "../server/src/physics/ed/sector";
import { solveExact, type ExactResult } from "../server/src/physics/ed/solve";
import type { Mat3, SpinCluster, Vec3 } from "../server/src/physics/types";

const J2 = 0.24;
/** Inside the S^z = 2 plateau of both rings (24 sites: 0.46-0.77; 20 sites: 0.56-0.93). */
const FIELD = 0.6;

function iso(J: number): Mat3 {
  return [
    [J, 0, 0],
    [0, J, 0],
    [0, 0, J],
  ];
}

function j1j2Ring(N: number, h: number): SpinCluster {
  const bonds = [];
  for (let i = 0; i < N; i++) {
    bonds.push({ i, j: (i + 1) % N, matrix: iso(1) });
    bonds.push({ i, j: (i + 2) % N, matrix: iso(J2) });
  }
  return {
    spins: new Array<number>(N).fill(0.5),
    positions: Array.from({ length: N }, (_, i) => [i, 0, 0] as Vec3),
    bonds,
    singleIon: [],
    fields: new Array<Vec3>(N).fill([0, 0, h]),
    translations: [Array.from({ length: N }, (_, i) => (i + 1) % N)],
    translationVectors: [[1, 0, 0]],
    translationPeriods: [N],
  };
}

let peakRss = 0;
function sampleRss(): void {
  peakRss = Math.max(peakRss, process.memoryUsage().rss);
}

function mib(b: number): string {
  return `${(b / 2 ** 20).toFixed(0)} MiB`;
}

function run(N: number, momenta: "all" | number[]): ExactResult {
  return solveExact(
    j1j2Ring(N, FIELD),
    { conservedAxis: [0, 0, 1], sz: [2], momenta, correlators: { components: ["-+"] } },
    { onProgress: sampleRss },
  );
}

function summary(r: ExactResult): string[] {
  const lines: string[] = [];
  lines.push(
    `E0 = ${r.groundEnergyMeV.toFixed(10)} (${r.groundEnergyPerSiteMeV.toFixed(10)} per site), ground state at k index ${r.groundState.kIndex}, ` +
      `sector dimension ${r.dimension}, ${r.sectors.length} momentum sector(s), residual ${r.groundState.residual.toExponential(1)}`,
  );
  for (const c of r.correlators) {
    const top = [...c.poles].sort((a, b) => b.weight - a.weight).slice(0, 2);
    lines.push(
      `S-+(q = ${c.q.toFixed(4)}): ${c.steps} Lanczos steps, ${c.poles.length} poles, sum rule ${c.sumRule.total.toFixed(6)} / ${c.sumRule.expected.toFixed(6)}, ` +
        `dominant ${top.map((p) => `${p.energyMeV.toFixed(6)} (w ${p.weight.toFixed(4)})`).join(", ")}`,
    );
  }
  return lines;
}

/** Throughput of H x in the ground-state sector, cached rows and matrix-free, vs a plain copy. */
function throughput(N: number): string[] {
  const model = compileModel(j1j2Ring(N, FIELD), { conservedAxis: [0, 0, 1] });
  const A = 2 + model.spinSum;
  const space = ConfigSpace.create(Array.from(model.dims), A);
  const tb = performance.now();
  const basis = Basis.build(space, model.relabel.translation, true);
  const buildMs = performance.now() - tb;
  const lines: string[] = [
    `${N} sites, S^z = 2: ${space.size.toLocaleString("en-US")} states before momentum resolution, ` +
      `${basis.nReps.toLocaleString("en-US")} representatives (basis + lookup table built in ${buildMs.toFixed(0)} ms, ${mib(basis.bytes)})`,
  ];
  const bonds = model.pairs.length;
  for (const [label, k] of [
    ["k = 0 (real)", 0],
    ["k = 2pi/N (complex)", 1],
  ] as const) {
    const sector = new Sector(basis, k, !model.real);
    const x = sector.newVector();
    for (let i = 0; i < x.length; i++) x[i] = Math.sin(i);
    sector.mask(x);
    const y = sector.newVector();
    const time = (f: () => void, reps: number): number => {
      f();
      const t = performance.now();
      for (let i = 0; i < reps; i++) f();
      return (performance.now() - t) / 1000 / reps;
    };
    for (const cached of [true, false]) {
      const tc = performance.now();
      const ham = new SectorHamiltonian(model, sector, cached ? 1e9 : 0);
      const setupMs = performance.now() - tc;
      const t = time(() => ham.apply(x, y), cached ? 20 : 8);
      sampleRss();
      const rate = (basis.nReps * bonds) / t;
      // bytes one product streams at least: the cached rows (or the lookup table), x, y, diagonal
      const streamed = (cached ? ham.bytes : basis.table!.byteLength + ham.bytes) + 2 * x.byteLength;
      const src = new Float64Array(Math.ceil(streamed / 16));
      const dst = new Float64Array(src.length);
      const tCopy = time(() => dst.set(src), 20);
      lines.push(
        `${label}, ${cached ? "cached rows" : "matrix-free"}: ${(t * 1e3).toFixed(2)} ms per H x, ` +
          `${(rate / 1e6).toFixed(0)} M states x bonds / s (${bonds} bonds, setup ${setupMs.toFixed(0)} ms); ` +
          `Float64Array copy of the same ${mib(streamed)} (read ${mib(streamed / 2)} + write ${mib(streamed / 2)}) ` +
          `${(tCopy * 1e3).toFixed(2)} ms = ${(streamed / tCopy / 1e9).toFixed(1)} GB/s; ratio H x / copy = ${(t / tCopy).toFixed(1)}`,
      );
    }
  }
  return lines;
}

export async function benchEd(): Promise<string[]> {
  const lines: string[] = [];
  peakRss = process.memoryUsage().rss;
  const rssStart = peakRss;

  // 20 sites, all momenta scanned (target < 1 s)
  {
    const t = performance.now();
    const r = run(20, "all");
    const s = (performance.now() - t) / 1000;
    lines.push(`20-site J1-J2 ring (J2 = ${J2}, h = ${FIELD}), S^z = 2, all momenta + S-+ at 3 q: ${s.toFixed(2)} s (target < 1 s)`);
    for (const l of summary(r)) lines.push(`  ${l}`);
  }
  // 24 sites: ground-state momentum given (k = 0, found by the full scan below)
  let k0 = 0;
  {
    const t = performance.now();
    const r = run(24, [0]);
    const s = (performance.now() - t) / 1000;
    lines.push(
      `24-site J1-J2 ring, S^z = 2, ground state in the k = 0 sector + S-+ at 3 q: ${s.toFixed(2)} s (target < 5 s), ` +
        `kernel ${r.stats.kernel}, ${(r.stats.elementsPerSecond / 1e6).toFixed(0)} M states x terms / s over ${r.stats.matvecs} products`,
    );
    for (const l of summary(r)) lines.push(`  ${l}`);
  }
  // 24 sites: every momentum sector scanned for the ground state (13 sectors, k and -k equal)
  {
    const t = performance.now();
    const r = run(24, "all");
    const s = (performance.now() - t) / 1000;
    k0 = r.groundState.kIndex ?? 0;
    lines.push(`24-site ring, S^z = 2, all 13 momentum sectors scanned + S-+ at 3 q: ${s.toFixed(2)} s (ground state at k index ${k0})`);
    const per = r.sectors.map((x) => `${x.kIndex}:${x.matvecs}`).join(" ");
    lines.push(`  Lanczos products per sector (k index: products): ${per}`);
  }
  lines.push("kernel throughput:");
  for (const l of throughput(24)) lines.push(`  ${l}`);
  sampleRss();
  lines.push(`peak RSS during the ED benchmark ${mib(peakRss)} (at start ${mib(rssStart)})`);
  return lines;
}
