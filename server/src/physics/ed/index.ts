// Public API of the exact-diagonalization engine (see solve.ts for the result fields).
export {
  solveExact,
  type CorrelatorComponent,
  type ExactOptions,
  type ExactHooks,
  type ExactResult,
  type SectorResult,
  type CorrelatorResult,
  type PoleResult,
  type LarmorResult,
  type BranchResult,
} from "./solve";
export {
  CancelledError,
  EdSizeError,
  EdInputError,
  serializeEdError,
  deserializeEdError,
  type EdError,
  type SerializedEdError,
} from "./errors";
export { runExactInWorker, defaultWorkerPath, type RunInWorkerOptions } from "./runInWorker";
