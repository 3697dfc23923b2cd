// Heavy analysis jobs that run off the caller's thread: an exact solve of a cluster, or the exact
// calibration of a chain's predictions. `runJob` is synchronous and runs inside the worker.
// Host layer (Node): imports analysis and physics; used by the CLI and the language server.
import { calibrateChain } from "../analysis/exactCalibration";
import type { ChainCouplings, ExactCalibration } from "../analysis/predictions";
import { solveExact, type ExactHooks, type ExactOptions, type ExactResult } from "../physics/ed/solve";
import type { SpinCluster } from "../physics/types";

export type HeavyJob =
  | { readonly kind: "solve"; readonly cluster: SpinCluster; readonly options: ExactOptions }
  | { readonly kind: "calibrate"; readonly couplings: ChainCouplings; readonly sites: number };

export type JobResult<J extends HeavyJob> = J extends { kind: "solve" } ? ExactResult : ExactCalibration;

export function runJob(job: HeavyJob, hooks: ExactHooks = {}): ExactResult | ExactCalibration {
  switch (job.kind) {
    case "solve":
      return solveExact(job.cluster, job.options, hooks);
    case "calibrate":
      return calibrateChain(job.couplings, job.sites, hooks);
  }
}
