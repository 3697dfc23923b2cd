// Heavy analysis jobs that run off the caller's thread: an exact solve of a cluster, or the exact
// calibration of a chain's predictions. `runJob` is synchronous and runs inside the worker.
// Host layer (Node): imports analysis and physics; used by the CLI and the language server.
import type { DocumentAnalysis } from "../analysis/analyze";
import { calibrateChain } from "../analysis/exactCalibration";
import { buildFiniteCluster } from "../model/cluster";
import type { ChainCouplings, ExactCalibration } from "../analysis/predictions";
import type { SerializedEdError } from "../physics/ed/errors";
import { solveExact, type ExactHooks, type ExactOptions, type ExactResult } from "../physics/ed/solve";
import type { SpinCluster, Vec3 } from "../physics/types";

export type HeavyJob =
  | { readonly kind: "solve"; readonly cluster: SpinCluster; readonly options: ExactOptions }
  | { readonly kind: "calibrate"; readonly couplings: ChainCouplings; readonly sites: number };

/** Messages from a job worker (Node worker thread or Web Worker) to its parent. */
export type JobWorkerMessage =
  | { type: "progress"; fraction: number; stage: string }
  | { type: "result"; result: unknown }
  | { type: "error"; error: SerializedEdError };

export type JobResult<J extends HeavyJob> = J extends { kind: "solve" } ? ExactResult : ExactCalibration;

export function runJob(job: HeavyJob, hooks: ExactHooks = {}): ExactResult | ExactCalibration {
  switch (job.kind) {
    case "solve":
      return solveExact(job.cluster, job.options, hooks);
    case "calibrate":
      return calibrateChain(job.couplings, job.sites, hooks);
  }
}

/** The conserved axis the solver may use: the axis of the full Hamiltonian's U(1), if any. */
export function conservedAxisFor(a: DocumentAnalysis): Vec3 | undefined {
  const s = a.physics?.symmetry;
  if (!s) return undefined;
  if (s.full === "u1" && s.fullAxis) return s.fullAxis;
  if (s.full === "su2") return [0, 0, 1];
  return undefined;
}

/**
 * The exact solve of a file's finite cluster, as the CLI and the editor run it: U(1) sectors when
 * the model allows, the transverse correlator at q = 0, 2 pi/L, 4 pi/L and the spin current.
 */
export function clusterSolveJob(a: DocumentAnalysis, cells?: readonly number[]): { ok: true; job: HeavyJob & { kind: "solve" } } | { ok: false; reason: string } {
  if (!a.model) return { ok: false, reason: "no model to solve" };
  const built = buildFiniteCluster(a.model, cells);
  if (!built.ok) return built;
  const axis = conservedAxisFor(a);
  const L = built.value.cluster.translationPeriods?.[0];
  const q = L ? [0, (2 * Math.PI) / L, (4 * Math.PI) / L] : [0];
  const options: ExactOptions = { ...(axis ? { conservedAxis: axis } : {}), correlators: { q, components: axis ? ["-+", "current-"] : ["-+"] } };
  return { ok: true, job: { kind: "solve", cluster: built.value.cluster, options } };
}
