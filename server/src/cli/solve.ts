// `spinwright solve`: exact diagonalization of the file's finite cluster in a worker thread, with
// progress and Ctrl-C, and `--exact` calibration of the chain predictions. CLI layer.
import type { DocumentAnalysis } from "../analysis/analyze";
import type { ExactCalibration } from "../analysis/predictions";
import { MEV_PER_GHZ } from "../model/units";
import type { ExactResult } from "../physics/ed/solve";
import { runJobInWorker } from "../host/runJob";
import { clusterSolveJob } from "../host/jobs";
import { progressReporter } from "./progress";

export class CliFailure extends Error {}

/** Runs a job with a progress bar and Ctrl-C cancellation. */
async function withProgress<T>(label: string, run: (signal: AbortSignal, onProgress: (f: number, s: string) => void) => Promise<T>): Promise<T> {
  const controller = new AbortController();
  const reporter = progressReporter(label);
  const onSigint = (): void => controller.abort();
  process.once("SIGINT", onSigint);
  try {
    return await run(controller.signal, (f, s) => reporter.update(f, s));
  } catch (e) {
    if ((e as Error).name === "CancelledError" || controller.signal.aborted) throw new CliFailure("cancelled (Ctrl-C)");
    throw new CliFailure((e as Error).message);
  } finally {
    reporter.done();
    process.removeListener("SIGINT", onSigint);
  }
}

export async function runSolve(a: DocumentAnalysis, sites: number | undefined): Promise<ExactResult> {
  const m = a.model;
  if (!m) throw new CliFailure("no model to solve");
  const dim = m.lattice?.dimension ?? 1;
  const basis = m.lattice?.sites.length ?? 1;
  let cells: number[] | undefined;
  if (sites !== undefined) {
    if (dim !== 1) throw new CliFailure("--sites applies to chains; give the cluster in the file for 2D and 3D lattices");
    if (sites % basis !== 0) throw new CliFailure(`--sites must be a multiple of the ${basis} sites per cell`);
    cells = [sites / basis];
  }
  const prepared = clusterSolveJob(a, cells);
  if (!prepared.ok) throw new CliFailure(prepared.reason);
  const n = prepared.job.cluster.spins.length;
  return withProgress(`exact check, ${n} sites`, (signal, onProgress) => runJobInWorker(prepared.job, { signal, onProgress }));
}

export async function runCalibration(a: DocumentAnalysis, sites: number): Promise<ExactCalibration | null> {
  const c = a.physics?.predictions.couplings;
  if (!c) return null;
  if (sites % 2 !== 0 || sites < 8 || sites > 24) throw new CliFailure("--sites for the exact calibration is an even number from 8 to 24");
  return withProgress(`exact calibration, ${sites}-site ring`, (signal, onProgress) =>
    runJobInWorker({ kind: "calibrate", couplings: c, sites }, { signal, onProgress }),
  );
}

export function solveJson(file: string, a: DocumentAnalysis, r: ExactResult): Record<string, unknown> {
  return {
    file,
    model: a.model?.name ?? null,
    sites: r.sites,
    dimension: r.dimension,
    hilbertDimension: r.hilbertDimension,
    conserved: r.conserved,
    frameAxis: r.frameAxis,
    sectors: r.sectors.map((s) => ({ sz: s.sz, k: s.k, dimension: s.dimension, lowestEnergyMeV: s.lowestEnergyMeV, converged: s.converged })),
    groundState: r.groundState,
    groundEnergyMeV: r.groundEnergyMeV,
    groundEnergyPerSiteMeV: r.groundEnergyPerSiteMeV,
    magnetization: r.magnetization,
    correlators: r.correlators.map((c) => ({ q: c.q, component: c.component, poles: c.poles, sumRule: c.sumRule })),
    larmor: r.larmor,
    branches: r.branches,
    splittingMeV: r.splittingMeV,
    velocityMeV: r.velocityMeV,
    seconds: r.seconds,
    warnings: r.warnings,
    stats: r.stats,
  };
}

export function solveText(file: string, r: ExactResult): string {
  const f = (x: number | null | undefined, d = 6): string => (x === null || x === undefined ? "n/a" : String(Number(x.toPrecision(d))));
  const out: string[] = [];
  out.push(`== ${file}: exact diagonalization (Lanczos), ${r.sites} sites, ${r.conserved ? "S.n conserved" : "no conserved axis"}${r.translationPeriod ? `, momentum sectors (period ${r.translationPeriod})` : ""}`);
  out.push(`sectors diagonalized: ${r.sectors.length}; largest ${Math.max(...r.sectors.map((s) => s.dimension))} states; ground-state sector dimension ${r.dimension}`);
  out.push(`ground state: E0 = ${f(r.groundEnergyMeV)} meV (${f(r.groundEnergyPerSiteMeV)} meV per site), m = ${f(r.magnetization)} per site${r.groundState.sz !== null ? `, Sz = ${r.groundState.sz}` : ""}`);
  if (r.larmor) {
    const z = r.larmor.zeemanMeV;
    out.push(
      r.larmor.singlePole
        ? `q = 0: a single line at the Zeeman energy ${f(z)} meV (${f((z ?? 0) / MEV_PER_GHZ)} GHz), as the Larmor theorem requires`
        : `q = 0: not a single line: mean ${f(r.larmor.meanMeV)} meV (offset from h ${f(r.larmor.offsetFromZeemanMeV)} meV), width ${f(r.larmor.widthMeV)} meV`,
    );
  }
  for (const b of r.branches) out.push(`q = ${f(b.q / Math.PI, 4)} pi: dominant poles ${b.dominant.map((p) => `${f(p.energyMeV)} meV (weight ${f(p.weight, 3)})`).join(", ")}`);
  const q0 = r.correlators.find((c) => c.component === "-+" && c.q === 0);
  if (q0 && r.larmor && !r.larmor.singlePole) {
    const top = [...q0.poles].sort((x, y) => y.weight - x.weight).slice(0, 3).sort((x, y) => x.energyMeV - y.energyMeV);
    out.push(`q = 0 lines: ${top.map((p) => `${f(p.energyMeV)} meV (weight ${f(p.weight, 3)})`).join(", ")}`);
  }
  const s = r.splittingMeV;
  const mev = (x: number | null): string => (x === null ? "n/a" : `${f(x)} meV`);
  out.push(`splitting: from the spin-current pole ${mev(s.fromCurrent)}; from the branch sum at q = 2 pi/N ${mev(s.fromBranchSum)}; linear q -> 0 extrapolation ${mev(s.fromExtrapolation)}`);
  for (const c of r.correlators) out.push(`  sum rule ${c.component} at q = ${f(c.q / Math.PI, 4)} pi: poles ${f(c.sumRule.total)} vs <A+A> ${f(c.sumRule.expected)}`);
  if (r.velocityMeV !== null) out.push(`velocity: ${f(r.velocityMeV)} meV x lattice spacing`);
  for (const w of r.warnings) out.push(`note: ${w}`);
  out.push(`time: ${f(r.seconds, 3)} s`);
  return out.join("\n") + "\n";
}
