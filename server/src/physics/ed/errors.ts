// Error types of the exact-diagonalization engine. Both carry plain data so that they survive
// a structured clone (worker boundary): see `serializeEdError` / `deserializeEdError`.

/** Thrown when a run is cancelled through `hooks.signal.aborted` (checked inside all long loops). */
export class CancelledError extends Error {
  readonly code = "cancelled" as const;
  constructor(message = "exact diagonalization cancelled") {
    super(message);
    this.name = "CancelledError";
  }
}

/**
 * Thrown before any large allocation when a sector is too big: more states than
 * `options.maxStates` or an estimated memory need above `options.maxMemoryBytes`.
 * The message states the dimension and the memory it would need.
 */
export class EdSizeError extends Error {
  readonly code = "too-large" as const;
  constructor(
    message: string,
    /** Dimension of the offending sector (states after symmetry resolution). */
    readonly dimension: number,
    /** Estimated bytes the computation would need. */
    readonly bytes: number,
    /** The limits in force. */
    readonly maxStates: number,
    readonly maxMemoryBytes: number,
  ) {
    super(message);
    this.name = "EdSizeError";
  }
}

/** Invalid input (inconsistent cluster, wrong symmetry claim, unsupported request). */
export class EdInputError extends Error {
  readonly code = "invalid-input" as const;
  constructor(message: string) {
    super(message);
    this.name = "EdInputError";
  }
}

export type EdError = CancelledError | EdSizeError | EdInputError;

/** Plain-object form of an engine error (JSON / structured-clone safe). */
export interface SerializedEdError {
  readonly name: string;
  readonly code: string;
  readonly message: string;
  readonly dimension?: number;
  readonly bytes?: number;
  readonly maxStates?: number;
  readonly maxMemoryBytes?: number;
  readonly stack?: string;
}

export function serializeEdError(e: unknown): SerializedEdError {
  if (e instanceof EdSizeError) {
    return {
      name: e.name,
      code: e.code,
      message: e.message,
      dimension: e.dimension,
      bytes: e.bytes,
      maxStates: e.maxStates,
      maxMemoryBytes: e.maxMemoryBytes,
    };
  }
  if (e instanceof CancelledError || e instanceof EdInputError) {
    return { name: e.name, code: e.code, message: e.message };
  }
  if (e instanceof Error) {
    return { name: e.name, code: "internal", message: e.message, ...(e.stack ? { stack: e.stack } : {}) };
  }
  return { name: "Error", code: "internal", message: String(e) };
}

export function deserializeEdError(s: SerializedEdError): Error {
  switch (s.code) {
    case "too-large":
      return new EdSizeError(s.message, s.dimension ?? NaN, s.bytes ?? NaN, s.maxStates ?? NaN, s.maxMemoryBytes ?? NaN);
    case "cancelled":
      return new CancelledError(s.message);
    case "invalid-input":
      return new EdInputError(s.message);
    default: {
      const e = new Error(s.message);
      e.name = s.name;
      if (s.stack) e.stack = s.stack;
      return e;
    }
  }
}

export function formatBytes(b: number): string {
  if (!Number.isFinite(b)) return "an unbounded amount of memory";
  if (b >= 2 ** 30) return `${(b / 2 ** 30).toFixed(2)} GiB`;
  if (b >= 2 ** 20) return `${(b / 2 ** 20).toFixed(1)} MiB`;
  if (b >= 2 ** 10) return `${(b / 2 ** 10).toFixed(1)} KiB`;
  return `${b} B`;
}
