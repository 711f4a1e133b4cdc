/**
 * Compile: a flat circuit becomes devices bound to a numbered unknown vector
 * and flat workspaces. Node voltages come first (in order of appearance),
 * then each device's internal nodes and branch currents. Every matrix
 * position a device stamps is computed here once, so the Newton loop only
 * indexes Float64Arrays.
 */
import {
  createBjt, createCapacitor, createCccs, createCcvs, createCurrentSource, createDiode, createInductor,
  createResistor, createVccs, createVcvs, createVoltageSource,
  type Device, type IndependentSource, type SlotBinder, type UnknownAllocator,
} from '@railcheck/devices';
import { match } from 'ts-pattern';
import { errorAt, type Diagnostic } from '../errors.js';
import type { FlatCircuit, FlatElement } from '../elaborate/flat.js';
import { GROUND_KEY } from '../elaborate/flat.js';
import { createWorkspace, type Workspace } from './workspace.js';
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

function makeDevice(el: FlatElement, n: (key: string) => number): Device {
  return match(el)
    .returnType<Device>()
    .with({ kind: 'resistor' }, (e) => createResistor(e.name, n(e.nodes[0]), n(e.nodes[1]), e.ohms))
    .with({ kind: 'capacitor' }, (e) => createCapacitor(e.name, n(e.nodes[0]), n(e.nodes[1]), e.farads, e.ic))
    .with({ kind: 'inductor' }, (e) => createInductor(e.name, n(e.nodes[0]), n(e.nodes[1]), e.henries, e.ic))
    .with({ kind: 'vsource' }, (e) => createVoltageSource(e.name, n(e.nodes[0]), n(e.nodes[1]), e.spec))
    .with({ kind: 'isource' }, (e) => createCurrentSource(e.name, n(e.nodes[0]), n(e.nodes[1]), e.spec))
    .with({ kind: 'vcvs' }, (e) => createVcvs(e.name, n(e.nodes[0]), n(e.nodes[1]), n(e.nodes[2]), n(e.nodes[3]), e.gain))
    .with({ kind: 'vccs' }, (e) => createVccs(e.name, n(e.nodes[0]), n(e.nodes[1]), n(e.nodes[2]), n(e.nodes[3]), e.gain))
    .with({ kind: 'cccs' }, (e) => createCccs(e.name, n(e.nodes[0]), n(e.nodes[1]), e.control, e.gain))
    .with({ kind: 'ccvs' }, (e) => createCcvs(e.name, n(e.nodes[0]), n(e.nodes[1]), e.control, e.gain))
    .with({ kind: 'diode' }, (e) => createDiode(e.name, n(e.nodes[0]), n(e.nodes[1]), e.model, e.area))
    .with({ kind: 'bjt' }, (e) => createBjt(e.name, n(e.nodes[0]), n(e.nodes[1]), n(e.nodes[2]), e.model, e.area))
    .exhaustive();
}

/** Compiles a flat circuit: numbers unknowns, binds stamps, checks topology. */
export function compileCircuit(flat: FlatCircuit): CompileResult {
  const unknowns: UnknownInfo[] = [{ kind: 'node', name: '0' }];
  const nodeIndex = new Map<string, number>([[GROUND_KEY, 0]]);
  for (const node of flat.nodes) {
    nodeIndex.set(node.key, unknowns.length);
    unknowns.push({ kind: 'node', name: node.name });
  }
  const index = (key: string): number => nodeIndex.get(key) ?? 0;
  const devices = flat.elements.map((el) => makeDevice(el, index));
  const deviceByKey = new Map(flat.elements.map((el, i) => [el.key, devices[i]!] as const));

  // Branches of voltage sources first, so that F/H can find their controls whatever the element order.
  const branchOf = new Map<string, number>();
  let stateSize = 0;
  let owner = '';
  const errors: Diagnostic[] = [];
  // Devices label their unknowns with their own name already (`D1:anode`, `V1`); others get the owner as prefix.
  const labelled = (label: string): string => (!label || label.toLowerCase() === owner.toLowerCase() ? owner : label.toLowerCase().startsWith(owner.toLowerCase()) ? label : `${owner}#${label}`);
  const allocator: UnknownAllocator = {
    internalNode: (label) => {
      unknowns.push({ kind: 'internal', name: labelled(label) });
      return unknowns.length - 1;
    },
    branch: (label) => {
      unknowns.push({ kind: 'branch', name: labelled(label) });
      branchOf.set(owner.toLowerCase(), unknowns.length - 1);
      return unknowns.length - 1;
    },
    state: (count) => {
      const at = stateSize;
      stateSize += count;
      return at;
    },
    controlBranch: (name) => branchOf.get(name) ?? 0,
  };
  const order = devices.map((_, i) => i).sort((a, b) => Number(devices[b]!.kind === 'vsource') - Number(devices[a]!.kind === 'vsource'));
  for (const i of order) {
    owner = devices[i]!.name;
    devices[i]!.allocate(allocator);
  }
  for (const el of flat.elements) {
    if ((el.kind === 'cccs' || el.kind === 'ccvs') && !branchOf.has(el.control)) {
      errors.push(errorAt('unknown-control', `${el.name}: controlling source '${el.control}' has no branch`, el.origin.pos, el.origin.lineText));
    }
  }
  const ws = createWorkspace(unknowns.length - 1, stateSize);
  const binder: SlotBinder = { slot: (row, col) => row * ws.size + col };
  for (const d of devices) d.bind(binder);

  const topo = checkTopology(flat, devices, unknowns);
  errors.push(...topo);
  if (errors.length > 0) return { ok: false, errors };

  const sources = new Map<string, IndependentSource>();
  flat.elements.forEach((el, i) => {
    if (el.kind === 'vsource' || el.kind === 'isource') sources.set(el.key, devices[i] as IndependentSource);
  });
  return { ok: true, circuit: { flat, devices, elements: flat.elements, unknowns, nodeIndex, sources, deviceByKey, ws } };
}
