/**
 * The SVG renderer (packages/cli/src/plot/svg.ts): every drawing parses
 * back as XML with fast-xml-parser, names each series with the number of
 * points it drew, shows axis ranges that hold all data, markers, rules and
 * `include`, writes no non-finite number, and escapes text. Ticks follow
 * the 1-2-5 rule and labels the SI prefixes; colours meet WCAG contrast.
 */
import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import { OKABE_ITO, PLOT_LOOK, renderSvg, SERIES_COLOURS } from '../../../packages/cli/src/plot/svg.js';
import type { PlotSeries, PlotSpec } from '../../../packages/cli/src/plot/spec.js';
import { seedFor } from '../../core/measure/linear/support.js';
import { EXAMPLES, linspace, logspace } from './examples.js';
import { axisRanges, findAll, parseXml, seriesCounts, textOf, type XmlNode } from './support.js';

const seed = seedFor('test/cli/plot/svg.test.ts');

/** A spec with defaults for what a case does not care about. */
const spec = (over: Partial<PlotSpec>): PlotSpec => ({ id: 'case', title: 'case', x: { label: 'input', unit: 'V' }, y: { label: 'output', unit: 'V' }, series: [], ...over });

/** The tick labels of axis `name`, in order. */
function tickLabels(doc: XmlNode, name: string): string[] {
  const axis = findAll(doc, (n) => n['data-axis'] === name)[0];
  if (!axis) throw new Error(`no axis ${name}`);
  const texts = axis['text'];
  return (Array.isArray(texts) ? texts : [texts]).filter((t) => (t as XmlNode)['class'] !== 'axis-title').map(textOf);
}

/** The shown range must hold every value of `vs` (finite, drawable ones). */
function expectHolds(range: { min: number; max: number } | undefined, vs: readonly number[]): void {
  expect(range).toBeDefined();
  for (const v of vs) {
    expect(v).toBeGreaterThanOrEqual(range!.min);
    expect(v).toBeLessThanOrEqual(range!.max);
  }
}

/** Every number in the document: attribute values and path data, as written. */
function numbersOf(svg: string): string[] {
  return svg.match(/-?\d+(?:\.\d+)?(?:e[+-]?\d+)?/g) ?? [];
}

describe('renderSvg: the drawing reads back', () => {
  test('the example of every kind is well-formed, standalone SVG with a title, viewBox and size', () => {
    for (const s of EXAMPLES) {
      const svg = renderSvg(s);
      const doc = parseXml(svg);
      const root = doc['svg'] as XmlNode;
      expect(root['xmlns']).toBe('http://www.w3.org/2000/svg');
      expect(root['viewBox']).toBe(`0 0 ${PLOT_LOOK.width} ${PLOT_LOOK.height}`);
      expect(root['width']).toBe(String(PLOT_LOOK.width));
      expect(textOf(root['title'])).toContain(s.title);
      expect(svg).not.toMatch(/NaN|Infinity/);
    }
  });

  test('lines, points and steps: each series named with the points it drew, ranges hold the data', () => {
    const x = linspace(0, 10, 11);
    const s = spec({
      series: [
        { name: 'a', x, y: x.map((v) => v * v) },
        { name: 'b', x, y: x.map((v) => -v), style: 'points' },
        { name: 'c', x: x.slice(0, 5), y: [1, 2, 3, 4, 5, 6, 7], style: 'step' },
      ],
    });
    const doc = parseXml(renderSvg(s));
    expect(seriesCounts(doc)).toEqual(new Map([['a', 11], ['b', 11], ['c', 5]]));
    const r = axisRanges(doc);
    expectHolds(r.get('x'), x);
    expectHolds(r.get('y'), [...x.map((v) => v * v), ...x.map((v) => -v)]);
    // Heckbert's nice numbers for 0..10 over about seven ticks: a step of 2 (1-2-5 rule; Graphics Gems, 1990).
    expect(tickLabels(doc, 'x')).toEqual(['0 V', '2 V', '4 V', '6 V', '8 V', '10 V']);
  });

  test('a log axis: decades labelled with SI prefixes, values ≤ 0 skipped', () => {
    const f = logspace(10, 1e6, 51);
    const doc = parseXml(renderSvg(spec({ x: { label: 'frequency', unit: 'Hz', log: true }, y: { label: 'rejection', unit: 'dB' }, series: [{ name: 'r', x: [0, -5, ...f], y: [1, 1, ...f.map((v) => 60 - 10 * Math.log10(v))] }] })));
    expect(seriesCounts(doc).get('r')).toBe(51);
    const r = axisRanges(doc).get('x')!;
    expectHolds(r, f);
    // Decades 10 Hz … 1 MHz in SI prefixes (SI Brochure, 9th ed., §3).
    expect(tickLabels(doc, 'x')).toEqual(['10 Hz', '100 Hz', '1 kHz', '10 kHz', '100 kHz', '1 MHz']);
    // dB takes no prefix.
    expect(tickLabels(doc, 'y').every((t) => /^-?\d+ dB$/.test(t))).toBe(true);
  });

  test('a log axis over less than a decade still has at least two labels, 1-2-5 first', () => {
    const doc = parseXml(renderSvg(spec({ x: { label: 'f', unit: 'Hz', log: true }, series: [{ name: 'r', x: [120, 900], y: [1, 2] }] })));
    const labels = tickLabels(doc, 'x');
    expect(labels.length).toBeGreaterThanOrEqual(2);
    expect(labels).toContain('200 Hz');
    expect(labels).toContain('500 Hz');
  });

  test('markers, rules and include widen the ranges; rules are dashed and labelled', () => {
    const s = spec({
      x: { label: 'input', unit: 'V', include: [0] },
      series: [{ name: 'out', x: [6, 7, 8], y: [4.9, 5, 5.01] }],
      markers: [{ x: 12, y: 5.2, label: 'far marker' }],
      xRules: [{ at: 3, label: 'rule at 3 V' }],
      yRules: [{ at: 4.5, label: 'limit 4.5 V' }],
    });
    const svg = renderSvg(s);
    const doc = parseXml(svg);
    const r = axisRanges(doc);
    expectHolds(r.get('x'), [0, 3, 6, 8, 12]);
    expectHolds(r.get('y'), [4.5, 4.9, 5.2]);
    const rules = findAll(doc, (n) => typeof n['class'] === 'string' && (n['class'] as string).startsWith('rule '));
    expect(rules).toHaveLength(2);
    for (const rule of rules) expect(rule['stroke-dasharray']).toBeDefined();
    for (const text of ['far marker', 'rule at 3 V', 'limit 4.5 V']) expect(svg).toContain(`>${text}</text>`);
  });

  test('a histogram: bars, counts from zero, a legend entry, integer count ticks', () => {
    const s = spec({ y: { label: 'runs', unit: '' }, histogram: { name: 'runs per bin', edges: [4.9, 4.95, 5, 5.05, 5.1], counts: [1, 3, 2, 0] }, xRules: [{ at: 4.8, label: 'min' }] });
    const doc = parseXml(renderSvg(s));
    expect(seriesCounts(doc).get('runs per bin')).toBe(4);
    const y = axisRanges(doc).get('y')!;
    expect(y.min).toBe(0);
    expectHolds(y, [0, 3]);
    expectHolds(axisRanges(doc).get('x'), [4.8, 4.9, 5.1]);
    for (const t of tickLabels(doc, 'y')) expect(Number.isInteger(Number(t))).toBe(true);
    expect(findAll(doc, (n) => n['class'] === 'legend')).toHaveLength(1);
  });

  test('a second y axis holds the right series only', () => {
    const t = linspace(0, 0.02, 21);
    const s = spec({ y2: { label: 'output', unit: 'V' }, series: [{ name: 'in', x: t, y: t.map((v) => 12 + Math.sin(600 * v)) }, { name: 'out', x: t, y: t.map((v) => 5 + 1e-3 * Math.sin(600 * v)), axis: 'right' }] });
    const doc = parseXml(renderSvg(s));
    const r = axisRanges(doc);
    expectHolds(r.get('y'), s.series[0]!.y);
    expectHolds(r.get('y2'), s.series[1]!.y);
    // The right axis is scaled to its own series (a millivolt ripple), not to the left's 12 V.
    expect(r.get('y2')!.max - r.get('y2')!.min).toBeLessThan(0.1);
    expect(renderSvg(s)).toContain('out (right axis)');
  });

  test('degenerate data: constant, a single point, empty, non-finite values', () => {
    const cases: PlotSeries[][] = [
      [{ name: 'flat', x: [0, 1, 2], y: [5, 5, 5] }],
      [{ name: 'one', x: [3], y: [7] }],
      [{ name: 'none', x: [], y: [] }],
      [{ name: 'zero', x: [0, 0], y: [0, 0] }],
      [{ name: 'holes', x: [0, 1, 2, 3, 4], y: [NaN, 1, Infinity, -Infinity, 2] }],
      [{ name: 'only-holes', x: [NaN, 1], y: [2, NaN] }],
    ];
    const expected = [3, 1, 0, 2, 2, 0];
    cases.forEach((series, k) => {
      const svg = renderSvg(spec({ series }));
      expect(svg).not.toMatch(/NaN|Infinity/);
      const doc = parseXml(svg);
      expect(seriesCounts(doc).get(series[0]!.name)).toBe(expected[k]);
      const r = axisRanges(doc);
      for (const a of ['x', 'y']) expect(r.get(a)!.max).toBeGreaterThan(r.get(a)!.min);
    });
    // A constant 5 V is shown with room about it.
    const flat = axisRanges(parseXml(renderSvg(spec({ series: cases[0]! })))).get('y')!;
    expect(flat.min).toBeLessThan(5);
    expect(flat.max).toBeGreaterThan(5);
  });

  test('text with markup characters is escaped and reads back unchanged', () => {
    const nasty = `a<b & c>"d" 'e' </svg>`;
    const s = spec({ id: 'nasty', title: nasty, subtitle: nasty, x: { label: nasty, unit: 'V' }, series: [{ name: nasty, x: [1, 2], y: [1, 2] }, { name: 'other', x: [1], y: [1] }], markers: [{ x: 1, y: 1, label: nasty }], xRules: [{ at: 1.5, label: nasty }] });
    const svg = renderSvg(s);
    const doc = parseXml(svg);
    // fast-xml-parser decodes the five predefined entities (XML 1.0, §4.6) in attributes and text.
    expect(seriesCounts(doc).get(nasty)).toBe(2);
    expect(textOf(findAll(doc, (n) => n['class'] === 'title')[0])).toBe(nasty);
    expect(svg.match(/<\/svg>/g)).toHaveLength(1);
  });

  test('every number written is finite with at most two decimals of a pixel (data ranges aside)', () => {
    for (const s of EXAMPLES) {
      const svg = renderSvg(s).replace(/data-(min|max)="[^"]*"/g, '');
      for (const num of numbersOf(svg.replace(/<text[^>]*>[^<]*<\/text>/g, '').replace(/<title[^>]*>[^<]*<\/title>/g, ''))) {
        expect(Number.isFinite(Number(num))).toBe(true);
        expect(num.split('.')[1]?.length ?? 0).toBeLessThanOrEqual(2);
      }
    }
  });
});

describe('renderSvg: properties over random series', () => {
  const value = fc.oneof({ weight: 8, arbitrary: fc.double({ min: -1e6, max: 1e6, noNaN: true }) }, { weight: 1, arbitrary: fc.constantFrom(NaN, Infinity, -Infinity, 0, 1e-300, -1e99) }, { weight: 1, arbitrary: fc.double() });
  const name = fc.string({ unit: fc.constantFrom('a', 'b', '<', '&', '>', '"', "'", ' ', 'µ', 'z'), maxLength: 8 });
  const series = fc.record({
    name,
    x: fc.array(value, { maxLength: 40 }),
    y: fc.array(value, { maxLength: 40 }),
    style: fc.constantFrom<'line' | 'points' | 'step'>('line', 'points', 'step'),
    axis: fc.constantFrom<'left' | 'right'>('left', 'right'),
  });
  const specs = fc.record({
    series: fc.array(series, { maxLength: 4 }),
    xLog: fc.boolean(),
    yLog: fc.boolean(),
    markers: fc.array(fc.record({ x: value, y: value, label: name }), { maxLength: 3 }),
    xRules: fc.array(fc.record({ at: value, label: name }), { maxLength: 2 }),
    yRules: fc.array(fc.record({ at: value, label: name }), { maxLength: 2 }),
    hist: fc.option(fc.record({ edges: fc.array(value, { maxLength: 8 }), counts: fc.array(fc.nat(1000), { maxLength: 8 }) }), { nil: undefined }),
    unit: fc.constantFrom('V', 'A', 'Hz', 'dB', '%', '', 's'),
  });

  test('every output is well-formed, writes no NaN or Infinity, counts the drawable points, and its ranges hold them', () => {
    fc.assert(
      fc.property(specs, (p) => {
        const s: PlotSpec = {
          id: 'random',
          title: 'random',
          x: { label: 'x', unit: p.unit, log: p.xLog },
          y: { label: 'y', unit: p.unit, log: p.yLog },
          y2: { label: 'y2', unit: p.unit },
          series: p.series,
          markers: p.markers,
          xRules: p.xRules,
          yRules: p.yRules,
          ...(p.hist ? { histogram: { name: 'h', edges: [...p.hist.edges].sort((a, b) => a - b), counts: p.hist.counts } } : {}),
        };
        const svg = renderSvg(s);
        expect(svg.replace(/>[^<]*</g, '><')).not.toMatch(/NaN|Infinity/);
        const doc = parseXml(svg);
        const r = axisRanges(doc);
        for (const a of r.values()) {
          expect(Number.isFinite(a.min) && Number.isFinite(a.max)).toBe(true);
          expect(a.max).toBeGreaterThan(a.min);
        }
        // The drawable points: finite, at most 1e100 in size, and at least 1e-100 on a log axis (the renderer's documented bounds).
        const ok = (v: number, log: boolean): boolean => Number.isFinite(v) && Math.abs(v) <= 1e100 && (!log || v >= 1e-100);
        const paths = findAll(doc, (n) => typeof n['data-series'] === 'string' && n['d'] !== undefined);
        expect(paths).toHaveLength(s.series.length);
        s.series.forEach((ser, k) => {
          const pts = ser.x.slice(0, Math.min(ser.x.length, ser.y.length)).map((x, i) => [x, ser.y[i]!] as const).filter(([x, y]) => ok(x, p.xLog) && ok(y, ser.axis === 'right' ? false : p.yLog));
          expect(Number(paths[k]!['data-points'])).toBe(pts.length);
          const yr = r.get(ser.axis === 'right' ? 'y2' : 'y')!;
          // 12 significant digits in data-min/max: compare with that much slack.
          const slack = (v: number): number => Math.abs(v) * 1e-11;
          for (const [x, y] of pts) {
            expect(x).toBeGreaterThanOrEqual(r.get('x')!.min - slack(x));
            expect(x).toBeLessThanOrEqual(r.get('x')!.max + slack(x));
            expect(y).toBeGreaterThanOrEqual(yr.min - slack(y));
            expect(y).toBeLessThanOrEqual(yr.max + slack(y));
          }
        });
      }),
      { seed, numRuns: 150 },
    );
  });
});

describe('the look', () => {
  /** Relative luminance and contrast ratio as WCAG 2.1 defines them (Understanding SC 1.4.3, "relative luminance"). */
  const luminance = (hex: string): number => {
    const c = [1, 3, 5].map((i) => parseInt(hex.slice(i, i + 2), 16) / 255).map((v) => (v <= 0.04045 ? v / 12.92 : ((v + 0.055) / 1.055) ** 2.4));
    return 0.2126 * c[0]! + 0.7152 * c[1]! + 0.0722 * c[2]!;
  };
  const contrast = (a: string, b: string): number => (Math.max(luminance(a), luminance(b)) + 0.05) / (Math.min(luminance(a), luminance(b)) + 0.05);

  test('the palette is Okabe and Ito\'s (Color Universal Design, 2008; the eight values from memory)', () => {
    expect(OKABE_ITO).toEqual({ black: '#000000', orange: '#E69F00', skyBlue: '#56B4E9', bluishGreen: '#009E73', yellow: '#F0E442', blue: '#0072B2', vermillion: '#D55E00', reddishPurple: '#CC79A7' });
    expect(SERIES_COLOURS).not.toContain(OKABE_ITO.yellow);
  });

  test('the first four series colours have 3:1 against white (WCAG 2.1 SC 1.4.11), text 7:1 (SC 1.4.6)', () => {
    for (const c of SERIES_COLOURS.slice(0, 4)) expect(contrast(c, '#FFFFFF')).toBeGreaterThanOrEqual(3);
    expect(contrast(PLOT_LOOK.text, '#FFFFFF')).toBeGreaterThanOrEqual(7);
    expect(contrast(PLOT_LOOK.muted, '#FFFFFF')).toBeGreaterThanOrEqual(7);
    // The grid stays light: below the 3:1 of a graphic that must be seen, so it never competes with the data.
    expect(contrast(PLOT_LOOK.grid, '#FFFFFF')).toBeLessThan(1.5);
  });
});
