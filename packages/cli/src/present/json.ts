/**
 * The machine-readable result (figures.md, "Results"): `title`, `op`,
 * `figures`, `limits`, `warnings`, plus railcheck's own additions:
 * `file`, `temperature` (°C of `op`), `method`, `operating_points` (one per
 * `.temp` temperature), `sweeps` (DC sweeps as columns), `transients` and
 * `ac` (see docs/output.md).
 */
import { formatDiagnostic, type RunReport } from '@railcheck/core';
import { acJson, transientJson } from './waves.js';

/** Builds the JSON object for a run. */
export function reportJson(report: RunReport, steps = false): Record<string, unknown> {
  const nominal = report.operatingPoints[0];
  const op = (p: NonNullable<typeof nominal>) => ({ nodes: p.nodes, currents: p.currents, power: p.power });
  const cycle = report.figures?.cycleOperatingPoint;
  // A sine-fed stage: `op` holds cycle averages at periodic steady state, with each node's range over the cycle.
  const cycleOp = cycle
    ? {
        basis: 'cycle-average',
        nodes: Object.fromEntries(Object.entries(cycle.nodes).map(([n, v]) => [n, v.mean])),
        currents: cycle.currents,
        power: cycle.power,
        nodes_min: Object.fromEntries(Object.entries(cycle.nodes).map(([n, v]) => [n, v.min])),
        nodes_max: Object.fromEntries(Object.entries(cycle.nodes).map(([n, v]) => [n, v.max])),
        steady_state: cycle.steady,
      }
    : undefined;
  return {
    title: report.title,
    file: report.file,
    temperature: nominal?.temperature ?? 27,
    method: nominal?.method,
    op: cycleOp ?? (nominal ? { basis: 'dc', ...op(nominal) } : { basis: 'dc', nodes: {}, currents: {}, power: {} }),
    figures: report.figures?.values ?? {},
    vout_nominal: report.figures?.voutNominal,
    limits: (report.figures?.limits ?? []).map((l) => ({ figure: l.figure, op: l.op, value: l.value, actual: l.actual, pass: l.pass })),
    figure_conditions: Object.fromEntries((report.figures?.figures ?? []).map((f) => [f.kind, f.conditions])),
    warnings: report.warnings.map((w) => formatDiagnostic({ ...w, severity: 'warning' }).split('\n')[0]!),
    operating_points: report.operatingPoints.map((p) => ({ temperature: p.temperature, method: p.method, iterations: p.iterations, basis: cycle ? 'switch-on' : 'dc', ...op(p) })),
    sweeps: report.sweeps.map((s) => ({ source: s.source, temperature: s.temperature, values: s.values, nodes: s.nodes, currents: s.currents })),
    transients: report.transients.map((t) => transientJson(t, report.compiled, steps)),
    ac: report.ac.map(acJson),
  };
}
