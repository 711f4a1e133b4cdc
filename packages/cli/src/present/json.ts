/**
 * The machine-readable result (figures.md, "Results"): `title`, `op`,
 * `figures`, `limits`, `warnings`, plus railcheck's own additions:
 * `file`, `temperature` (°C of `op`), `method`, `not_measured` (figures
 * and values that could not be measured, with the reason), `status` and
 * `reason` in `limits[]`, `operating_points` (one per
 * `.temp` temperature), `sweeps` (DC sweeps as columns), `transients` and
 * `ac` (see docs/output.md).
 */
import { formatDiagnostic, type Diagnostic, type FigureReport, type LimitResult, type RunReport } from '@railcheck/core';
import { match } from 'ts-pattern';
import { acJson, transientJson } from './waves.js';

/** The place of a diagnostic as JSON members: `file`, `line`, `column` (absent when it names no place). */
function placeJson(d: Diagnostic): Record<string, string | number> {
  return d.pos ? { file: d.pos.file, line: d.pos.line, column: d.pos.column } : {};
}

/**
 * `not_measured`: one entry per figure not measured (`figure`: its kind)
 * and per value of a measured figure left out (`figure`: the kind,
 * `value`: the dotted name), with the reason's code, message, what was
 * expected when the reason says, and its place.
 */
export function notMeasuredJson(figures: FigureReport | undefined): Record<string, unknown>[] {
  const entry = (figure: string, reason: Diagnostic, value?: string): Record<string, unknown> => ({ figure, ...(value !== undefined ? { value } : {}), code: reason.code, reason: reason.message, ...(reason.expected !== undefined ? { expected: reason.expected } : {}), ...placeJson(reason) });
  return (figures?.figures ?? []).flatMap((f) =>
    match(f)
      .with({ ok: false }, (g) => [entry(g.kind, g.reason)])
      .with({ ok: true }, (g) => g.notMeasured.map((v) => entry(g.kind, v.reason, v.name)))
      .exhaustive(),
  );
}

/** One `limits[]` entry: `status` beside `pass`; not evaluated, `actual` is null and `reason` says why. */
export function limitJson(l: LimitResult): Record<string, unknown> {
  const common = { figure: l.figure, op: l.op, value: l.value };
  return match(l)
    .with({ status: 'not-evaluated' }, (r) => ({ ...common, actual: null, pass: false, status: r.status, reason: r.reason.message, ...placeJson(r.reason) }))
    .with({ status: 'pass' }, { status: 'fail' }, (r) => ({ ...common, actual: r.actual, pass: r.pass, status: r.status }))
    .exhaustive();
}

/** `stress` and `short_stress`: the stress table of the stress figure and of the short figure, rows with snake-case keys; each only when its figure was measured. */
function stressJson(report: RunReport): Record<string, unknown> {
  const rowsOf = (kind: 'stress' | 'short'): Record<string, unknown>[] | undefined => {
    const f = report.figures?.figures.find((g) => g.ok && g.kind === kind);
    if (!f || !f.ok || !f.stress) return undefined;
    return f.stress.map((r) => ({ element: r.element, quantity: r.quantity, unit: r.unit, worst: r.value, rating: r.rating, rated_by: r.ratedBy, ratio: r.ratio, derate: r.derate, status: r.status, where: r.where }));
  };
  const stress = rowsOf('stress');
  const short = rowsOf('short');
  return { ...(stress ? { stress } : {}), ...(short ? { short_stress: short } : {}) };
}

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
    limits: (report.figures?.limits ?? []).map(limitJson),
    not_measured: notMeasuredJson(report.figures),
    figure_conditions: Object.fromEntries((report.figures?.figures ?? []).flatMap((f) => (f.ok ? [[f.kind, f.conditions]] : []))),
    // The stress tables of the stress and short figures (docs/stress.md), when measured.
    ...stressJson(report),
    warnings: report.warnings.map((w) => formatDiagnostic({ ...w, severity: 'warning' }).split('\n')[0]!),
    operating_points: report.operatingPoints.map((p) => ({ temperature: p.temperature, method: p.method, iterations: p.iterations, basis: cycle ? 'switch-on' : 'dc', ...op(p) })),
    sweeps: report.sweeps.map((s) => ({ source: s.source, temperature: s.temperature, values: s.values, nodes: s.nodes, currents: s.currents })),
    transients: report.transients.map((t) => transientJson(t, report.compiled, steps)),
    ac: report.ac.map(acJson),
  };
}
