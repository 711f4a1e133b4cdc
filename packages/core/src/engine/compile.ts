/**
 * Compile: a flat circuit becomes devices bound to a numbered unknown vector
 * and flat workspaces. Node voltages come first (in order of appearance),
 * then each device's internal nodes and branch currents. Every matrix
 * position a device stamps is computed here once, so the Newton loop only
 * indexes Float64Arrays.
 */
import {
  DEVICES,
  type BranchRef, type Device, type DeviceEntry, type DeviceKind, type DeviceSpecs, type IndependentSource, type SlotBinder, type UnknownAllocator,
} from '@railcheck/devices';
import { errorAt, type Diagnostic } from '../errors.js';
import { MAX_UNKNOWNS } from '../budgets.js';
import type { FlatCircuit, FlatElement, FlatElementOf } from '../elaborate/flat.js';
import { FLAT_CIRCUITS, GROUND_KEY, flatShapeProblem } from '../elaborate/flat.js';
import { Brand, argumentDiagnostic, foreignFailure } from '../arguments.js';
import { StampCollector, createWorkspace, usesSparse, type Workspace } from './workspace.js';
import { checkTopology } from './topology.js';
import type { UnknownInfo } from './unknowns.js';

export type { UnknownInfo };


/** A circuit ready for analysis. */
export interface CompiledCircuit {
  readonly flat: FlatCircuit;
  /** Device instances, in element order. */
  readonly devices: readonly Device[];
  /** Flat element of each device (same order). */
  readonly elements: readonly FlatElement[];
  /** Index 1..n: what each unknown is (entry 0 is ground). */
  readonly unknowns: readonly UnknownInfo[];
  /** Node key → unknown index (ground → 0). */
  readonly nodeIndex: ReadonlyMap<string, number>;
  /** Independent sources by element key. */
  readonly sources: ReadonlyMap<string, IndependentSource>;
  /** Devices by element key. */
  readonly deviceByKey: ReadonlyMap<string, Device>;
  /** Solver storage. */
  readonly ws: Workspace;
}

/** Result of compiling. */
export type CompileResult = { readonly ok: true; readonly circuit: CompiledCircuit } | { readonly ok: false; readonly errors: readonly Diagnostic[] };

/**
 * Builds the device of one flat element through its registry entry: the
 * element's spec with node keys replaced by unknown indices.
 */
function makeDevice<K extends DeviceKind>(el: FlatElementOf<K>, n: (key: string) => number): Device {
  const entry = DEVICES[el.kind as K] as unknown as DeviceEntry<K>;
  const spec = { ...el, nodes: el.nodes.map(n) } as unknown as DeviceSpecs<number>[K];
  return entry.create(el.name, spec);
}

/** The registry's allocation rank (V first, K last); a stable sort keeps element order within a rank. */
function allocationRank(d: Device): number {
  return DEVICES[d.kind].allocationRank;
}

/** The MAX_UNKNOWNS error, located at the last element of the netlist: the circuit as a whole is over the budget. */
function overUnknowns(flat: FlatCircuit, count: string): CompileResult {
  const last = flat.elements[flat.elements.length - 1]?.origin;
  return { ok: false, errors: [errorAt('budget-unknowns', `the circuit has ${count}, over the budget MAX_UNKNOWNS = ${MAX_UNKNOWNS} of the dense solver`, last?.pos, last?.lineText, 'a smaller circuit')] };
}

/** One answer an allocator gave a device while it compiled, in call order (replayed by {@link revalueCircuit}). */
type Allocation =
  | { readonly op: 'internal' | 'branch'; readonly index: number }
  | { readonly op: 'state'; readonly count: number; readonly offset: number }
  | { readonly op: 'branchOf'; readonly key: string; readonly index: number };

/** What a compile handed each device (device order), kept for {@link revalueCircuit}. */
const ALLOCATIONS = new WeakMap<CompiledCircuit, readonly (readonly Allocation[])[]>();

/** Compiled circuits compileCircuit made; the only ones the functions that take one accept. */
export const COMPILED_CIRCUITS: Brand<CompiledCircuit> = new Brand<CompiledCircuit>('a compiled circuit as compileCircuit returns it');

/**
 * Compiles a flat circuit: numbers unknowns, binds stamps, checks
 * topology. An argument that is not a flat circuit is an `ok: false`
 * result (`bad-argument`).
 */
export function compileCircuit(flat: FlatCircuit): CompileResult {
  const wrong = flatShapeProblem(flat);
  if (wrong !== undefined) return { ok: false, errors: [argumentDiagnostic('compileCircuit', `flat (${wrong})`, 'a flat circuit as elaborate returns it', flat)] };
  try {
    const r = compileChecked(flat);
    if (r.ok) COMPILED_CIRCUITS.mark(r.circuit);
    return r;
  } catch (e) {
    return { ok: false, errors: foreignFailure('compileCircuit', e, FLAT_CIRCUITS.has(flat), 'a flat circuit as elaborate returns it').diagnostics };
  }
}

function compileChecked(flat: FlatCircuit): CompileResult {
  // The nodes alone are a lower bound on the unknowns: refuse before any device is made.
  if (flat.nodes.length > MAX_UNKNOWNS) return overUnknowns(flat, `at least ${flat.nodes.length} unknowns (its nodes alone)`);
  const unknowns: UnknownInfo[] = [{ kind: 'node', name: '0' }];
  const nodeIndex = new Map<string, number>([[GROUND_KEY, 0]]);
  for (const node of flat.nodes) {
    nodeIndex.set(node.key, unknowns.length);
    unknowns.push({ kind: 'node', name: node.name });
  }
  const index = (key: string): number => nodeIndex.get(key) ?? 0;
  const devices = flat.elements.map((el) => makeDevice(el, index));
  const deviceByKey = new Map(flat.elements.map((el, i) => [el.key, devices[i]!] as const));

  // Elements that own branches first, so that F, H and K find them whatever the element order.
  const branchOf = new Map<string, number>();
  let stateSize = 0;
  let owner = '';
  let ownerElement: FlatElement | undefined;
  const errors: Diagnostic[] = [];
  const fail = (message: string): void => {
    errors.push(errorAt('unknown-branch', message, ownerElement?.origin.pos, ownerElement?.origin.lineText, 'the name of an element with a branch current (a V element for F and H, an L element for K)'));
  };
  // Devices label their unknowns with their own name already (`D1:anode`, `V1`); others get the owner as prefix.
  const labelled = (label: string): string => (!label || label.toLowerCase() === owner.toLowerCase() ? owner : label.toLowerCase().startsWith(owner.toLowerCase()) ? label : `${owner}#${label}`);
  const given: Allocation[][] = devices.map(() => []);
  let record: Allocation[] = [];
  const allocator: UnknownAllocator = {
    internalNode: (label) => {
      unknowns.push({ kind: 'internal', name: labelled(label) });
      record.push({ op: 'internal', index: unknowns.length - 1 });
      return unknowns.length - 1;
    },
    branch: (label) => {
      unknowns.push({ kind: 'branch', name: labelled(label) });
      branchOf.set(owner.toLowerCase(), unknowns.length - 1);
      record.push({ op: 'branch', index: unknowns.length - 1 });
      return unknowns.length - 1;
    },
    state: (count) => {
      const at = stateSize;
      stateSize += count;
      record.push({ op: 'state', count, offset: at });
      return at;
    },
    branchOf: (key): BranchRef => {
      const target = deviceByKey.get(key);
      const index = branchOf.get(key);
      if (target && index !== undefined) {
        record.push({ op: 'branchOf', key, index });
        return { ok: true, index, device: target };
      }
      const reason = target ? 'no-branch' : 'no-such-element';
      fail(`${owner}: '${key}' ${reason === 'no-branch' ? 'has no branch current' : 'names no element of the circuit'}`);
      return { ok: false, reason };
    },
    fail,
  };
  const order = devices.map((_, i) => i).sort((a, b) => allocationRank(devices[a]!) - allocationRank(devices[b]!));
  for (const i of order) {
    owner = devices[i]!.name;
    ownerElement = flat.elements[i];
    record = given[i]!;
    devices[i]!.allocate(allocator);
  }
  // A failed look-up leaves a device without its indices: stop before any slot is bound.
  if (errors.length > 0) return { ok: false, errors };
  if (unknowns.length - 1 > MAX_UNKNOWNS) return overUnknowns(flat, `${unknowns.length - 1} unknowns`);
  // The devices' stamp positions first (the sparse path's pattern and ordering come from them), then the workspace.
  const sparse = usesSparse(unknowns.length - 1);
  const collector = new StampCollector(unknowns.length, sparse);
  const binder: SlotBinder = { slot: (row, col) => collector.slot(row, col) };
  for (const d of devices) d.bind(binder);
  const ws = createWorkspace(unknowns.length - 1, stateSize, collector.list(), sparse);

  const topo = checkTopology(flat, devices, unknowns);
  errors.push(...topo);
  if (errors.length > 0) return { ok: false, errors };

  const sources = sourcesOf(flat, devices);
  const circuit: CompiledCircuit = { flat, devices, elements: flat.elements, unknowns, nodeIndex, sources, deviceByKey, ws };
  ALLOCATIONS.set(circuit, given);
  return { ok: true, circuit };
}

/** Sources by key among the devices (element order). */
function sourcesOf(flat: FlatCircuit, devices: readonly Device[]): Map<string, IndependentSource> {
  const sources = new Map<string, IndependentSource>();
  flat.elements.forEach((el, i) => {
    if (el.kind === 'vsource' || el.kind === 'isource') sources.set(el.key, devices[i] as IndependentSource);
  });
  return sources;
}

/** Whether two flat circuits have the same elements (kind, key and nodes, in order) on the same nodes. */
function sameTopology(a: FlatCircuit, b: FlatCircuit): boolean {
  if (a.elements.length !== b.elements.length || a.nodes.length !== b.nodes.length || a.nodes.some((n, i) => n.key !== b.nodes[i]!.key)) return false;
  return a.elements.every((e, i) => {
    const f = b.elements[i]!;
    return e.kind === f.kind && e.key === f.key && e.nodes.length === f.nodes.length && e.nodes.every((n, k) => n === f.nodes[k]);
  });
}

/** Puts a workspace back to what {@link createWorkspace} gives: every array zero, the load context at its defaults, no step allowance. */
function resetWorkspace(ws: Workspace): void {
  ws.x.fill(0);
  ws.xNext.fill(0);
  ws.rhs.fill(0);
  ws.states[0].fill(0);
  ws.states[1].fill(0);
  ws.matrix.fill(0);
  if (ws.solver.kind === 'sparse') ws.solver.lu.reset();
  const ctx = ws.ctx;
  ctx.state = ws.states[0];
  ctx.statePrev = ws.states[1];
  ctx.mode = 'dc';
  ctx.sourceScale = 1;
  ctx.gmin = 0;
  ctx.junctionCmin = 0;
  ctx.time = 0;
  ctx.initJunctions = false;
  ctx.limited = false;
  ctx.chargeCurrent = 0;
  ctx.chargeConductance = 0;
  ctx.coefficients.a0 = 0;
  ctx.coefficients.a1 = 0;
  ws.stepAllowance = undefined;
}

/**
 * The circuit `flat`, which has the elements and nodes of `base.flat`
 * with other values (a tolerance run's sample), compiled on `base`'s
 * unknown numbering and workspace: its devices are made again from `flat`
 * and given the unknowns, branches and state slots `base`'s devices were
 * given (the allocation replayed), then bound; the workspace is reset to
 * zero. No topology check is repeated (the topology is `base`'s). This is
 * what a spread's runs cost instead of a compile: no workspace is
 * allocated and nothing of an earlier run survives, so the result equals
 * `compileCircuit(flat)`'s bit for bit. `base`, and every circuit earlier
 * revalued on it, share the workspace and must not be used afterwards.
 * A `flat` whose structure differs (other elements or nodes, or values
 * that change a device's allocation, such as a series resistance going
 * to zero) is compiled afresh instead.
 */
export function revalueCircuit(base: CompiledCircuit, flat: FlatCircuit): CompileResult {
  const given = ALLOCATIONS.get(base);
  if (given === undefined || !sameTopology(base.flat, flat)) return compileCircuit(flat);
  const index = (key: string): number => base.nodeIndex.get(key) ?? 0;
  const devices = flat.elements.map((el) => makeDevice(el, index));
  const deviceByKey = new Map(flat.elements.map((el, i) => [el.key, devices[i]!] as const));
  let record: readonly Allocation[] = [];
  let next = 0;
  let mismatch = false;
  const answer = (op: Allocation['op']): Allocation | undefined => {
    const a = record[next++];
    if (a?.op === op) return a;
    mismatch = true;
    return undefined;
  };
  const indexOf = (a: Allocation | undefined): number => (a !== undefined && a.op !== 'state' ? a.index : 0);
  const replay: UnknownAllocator = {
    internalNode: () => indexOf(answer('internal')),
    branch: () => indexOf(answer('branch')),
    state: (count) => {
      const a = answer('state');
      if (a?.op !== 'state' || a.count !== count) {
        mismatch = true;
        return 0;
      }
      return a.offset;
    },
    branchOf: (key): BranchRef => {
      const a = answer('branchOf');
      const target = deviceByKey.get(key);
      if (a?.op !== 'branchOf' || a.key !== key || !target) {
        mismatch = true;
        return { ok: false, reason: 'no-such-element' };
      }
      return { ok: true, index: a.index, device: target };
    },
    fail: () => {
      mismatch = true;
    },
  };
  const order = devices.map((_, i) => i).sort((a, b) => allocationRank(devices[a]!) - allocationRank(devices[b]!));
  for (const i of order) {
    record = given[i] ?? [];
    next = 0;
    devices[i]!.allocate(replay);
    if (next !== record.length) mismatch = true;
    if (mismatch) return compileCircuit(flat);
  }
  const ws = base.ws;
  // The same entries as base's devices bound, at the same positions; an entry base never stamped means another structure.
  const positions = ws.stamps.positions;
  const binder: SlotBinder = {
    slot: (row, col) => {
      if (row === 0 || col === 0) return 0;
      const at = positions.get(row * ws.size + col);
      if (at === undefined) mismatch = true;
      return at ?? 0;
    },
  };
  for (const d of devices) d.bind(binder);
  if (mismatch) return compileCircuit(flat);
  resetWorkspace(ws);
  const circuit: CompiledCircuit = { flat, devices, elements: flat.elements, unknowns: base.unknowns, nodeIndex: base.nodeIndex, sources: sourcesOf(flat, devices), deviceByKey, ws };
  ALLOCATIONS.set(circuit, given);
  COMPILED_CIRCUITS.mark(circuit);
  return { ok: true, circuit };
}
