// Plain numeric types shared by the physics layer: vectors, 3x3 matrices and the neutral
// description of a finite spin cluster. Physics layer: no syntax, no model, no editor types.

/** A 3-vector (x, y, z). */
export type Vec3 = readonly [number, number, number];

/** A 3x3 matrix, row-major: m[a][b]. */
export type Mat3 = readonly [Vec3, Vec3, Vec3];

/**
 * A finite spin cluster with its Hamiltonian, in one energy unit chosen by the caller
 * (the model layer passes meV). Conventions (physics-notes section 2):
 *
 *   H = sum_bonds S_i . J_b . S_j  +  sum_i S_i . A_i . S_i  -  sum_i h_i . S_i
 *
 * where h_i = muB g_i^T B is the effective Zeeman field on site i in energy units.
 * Each bond appears once. Spins are positive half-integers (0.5, 1, 1.5, ...).
 */
export interface SpinCluster {
  /** Spin length per site. */
  readonly spins: readonly number[];
  /** Cartesian position of each site (lattice units), used for momenta. */
  readonly positions: readonly Vec3[];
  /** Bonds, each counted once: S_i . matrix . S_j. */
  readonly bonds: readonly ClusterBond[];
  /** Single-ion tensors: S_i . matrix . S_i (symmetric). */
  readonly singleIon: readonly { readonly site: number; readonly matrix: Mat3 }[];
  /** Effective Zeeman field per site, h_i = muB g_i^T B (energy units); H contains -h_i . S_i. */
  readonly fields: readonly Vec3[];
  /**
   * Optional translation symmetry: `translation[t]` maps site index s to the index of the site
   * it moves to under one step of translation generator t (a permutation). Given only when the
   * cluster is periodic and the Hamiltonian is invariant under it.
   */
  readonly translations?: readonly (readonly number[])[];
  /** Primitive translation vectors matching `translations`, for momenta k . r. */
  readonly translationVectors?: readonly Vec3[];
  /** Number of translation steps around the cluster for each generator (its period). */
  readonly translationPeriods?: readonly number[];
}

export interface ClusterBond {
  readonly i: number;
  readonly j: number;
  /** Exchange matrix J_b in S_i . J_b . S_j. */
  readonly matrix: Mat3;
}
