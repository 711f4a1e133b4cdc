/**
 * What each entry of the solution vector stands for, shared by the compiler
 * and the topology checks.
 */

/** What an unknown of the solution vector stands for. */
export interface UnknownInfo {
  /** `node`: a circuit node voltage; `internal`: a device's internal node; `branch`: a branch current. */
  readonly kind: 'node' | 'internal' | 'branch';
  /** Name for reports: the node name, or `R1#int`-style labels for device unknowns. */
  readonly name: string;
}
