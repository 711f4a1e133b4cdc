/**
 * Connection checks on the flat circuit (docs/netlist.md, "Connection
 * checks"): single-connection warnings, the `.supply` load that does not
 * touch `out`, and the input source that shares no loop with the rail.
 * The expectations come from reading each circuit by hand: which node one
 * terminal alone touches, and whether a loop runs through the source and
 * across the rail (Kirchhoff's current law: a part of a circuit that hangs
 * from the rest by one node exchanges no current with it). The stages are
 * weather-station and bench-reference rails invented for these tests.
 */
import { readdirSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, test } from 'vitest';
import { elaborate, parseNetlist, readNetlistFile, runNetlist, type Diagnostic } from '@railcheck/core';
import { cli, freshDir, writeFiles } from '../diagnostics/support.js';

/** Elaborates `text`; the errors and the warnings of the connection checks. */
function check(text: string): { ok: boolean; errors: readonly Diagnostic[]; warnings: readonly Diagnostic[] } {
  const parsed = parseNetlist(text, { file: 'c.cir' });
  if (!parsed.ok) throw new Error(`the netlist should read: ${parsed.errors.map((e) => e.message).join('; ')}`);
  const r = elaborate(parsed.netlist);
  const ours = (d: Diagnostic): boolean => ['single-connection', 'load-off-output', 'load-not-across-rail', 'input-not-connected'].includes(d.code);
  return { ok: r.ok, errors: r.ok ? [] : r.errors.filter(ours), warnings: r.warnings.filter(ours) };
}

/** The weather-station follower, with `lines` in place of its load and with `supply` as its .supply line. */
function follower(lines: readonly string[], supply = '.supply in=VBAT out=out load=RL'): string {
  return [
    'Sensor rail follower',
    'VBAT in 0 12',
    'RB in ref 680',
    'DZ 0 ref ZREF',
    'Q1 in ref out NPASS',
    ...lines,
    '.model ZREF D (BV=5.6)',
    '.model NPASS NPN (BF=150)',
    supply,
    '.end',
  ].join('\n');
}

describe('single connections', () => {
  test('a misspelt node: one warning, at the card that touches it, naming the node and the element', () => {
    const r = check(follower(['RL out 0 100', 'RBLEED out 0 1k', 'COUT otu 0 100u']));
    expect(r.ok).toBe(true);
    expect(r.warnings).toHaveLength(1);
    const w = r.warnings[0]!;
    expect(w.pos?.line).toBe(8); // the COUT card
    expect(w.message).toMatch(/\botu\b/);
    expect(w.message).toMatch(/\bCOUT\b/);
    expect(w.message).toMatch(/n\+/);
  });

  test('every element kind counts its terminals: a transistor base, a diode cathode and an E controlling node', () => {
    const r = check([
      'Terminals',
      'V1 a 0 5',
      'R1 a 0 1k',
      'Q9 a nb 0 NP', // base alone on nb
      'D9 a nk DD', // cathode alone on nk
      'E9 e 0 sense 0 2', // controlling node sense alone
      'RE e 0 1k',
      '.model NP NPN',
      '.model DD D',
      '.end',
    ].join('\n'));
    const named = r.warnings.map((w) => w.message);
    expect(named).toHaveLength(3);
    expect(named.find((m) => /\bnb\b/.test(m))).toMatch(/base of Q9/);
    expect(named.find((m) => /\bnk\b/.test(m))).toMatch(/cathode of D9/);
    expect(named.find((m) => /\bsense\b/.test(m))).toMatch(/nc\+ \(controlling\) of E9/);
  });

  test('a node two terminals touch is not warned about, not even when both are one element\'s', () => {
    const r = check(['Two on one', 'V1 a 0 5', 'R1 a 0 1k', 'R2 a b 1k', 'C2 b b 1n', 'R3 b 0 1k', '.end'].join('\n'));
    expect(r.warnings).toEqual([]);
    const self = check(['Self', 'V1 a 0 5', 'R1 a 0 1k', 'C2 x x 1n', '.end'].join('\n'));
    expect(self.warnings).toEqual([]);
  });

  test('inside a subcircuit: the flat names, at the card inside the definition', () => {
    const r = check([
      'Bench reference',
      '.subckt half top bot',
      'R1 top mid 1k',
      'R2 mid bot 1k',
      'R3 mdi bot 1k',
      '.ends',
      'V1 in 0 8',
      'X1 in 0 half',
      '.end',
    ].join('\n'));
    expect(r.warnings).toHaveLength(1);
    expect(r.warnings[0]!.message).toMatch(/X1\.mdi/);
    expect(r.warnings[0]!.message).toMatch(/X1\.R3/);
    expect(r.warnings[0]!.pos?.line).toBe(5);
  });

  test('ground with a single connection is warned about too', () => {
    const r = check(['Lifted ground', 'V1 a 0 5', 'R1 a b 1k', 'R2 b a 1k', '.end'].join('\n'));
    expect(r.warnings.map((w) => w.message)).toEqual([expect.stringMatching(/ground \(0\).*V1/)]);
  });

  test('the nodes .supply names count the .supply line: an unloaded output on one emitter is not a stray wire', () => {
    const r = check(follower([], '.supply in=VBAT out=out'));
    expect(r.ok).toBe(true);
    expect(r.warnings).toEqual([]);
    // The same circuit without .supply: out is the emitter's alone.
    const bare = check(follower([], ''));
    expect(bare.warnings.map((w) => w.message)).toEqual([expect.stringMatching(/node out .*emitter of Q1/)]);
  });
});

describe('the .supply load', () => {
  test('a load on a mistyped node: an error at the .supply line naming the load, its nodes and out', () => {
    const text = follower(['RBLEED out 0 1k', 'RL ouy 0 100']);
    const r = check(text);
    expect(r.ok).toBe(false);
    expect(r.errors).toHaveLength(1);
    const e = r.errors[0]!;
    expect(e.code).toBe('load-off-output');
    expect(e.pos?.line).toBe(10);
    expect(e.lineText).toBe('.supply in=VBAT out=out load=RL');
    expect(e.message).toMatch(/\bRL\b/);
    expect(e.message).toMatch(/\bouy and 0\b/);
    expect(e.message).toMatch(/\bout\b/);
    expect(e.expected).toMatch(/terminal on out/);
    // The stray node itself is warned about as well.
    expect(r.warnings.map((w) => w.message)).toEqual([expect.stringMatching(/\bouy\b.*\bRL\b/)]);
  });

  test('a load that touches out but whose other end leads nowhere carries no current: an error', () => {
    const r = check(follower(['RBLEED out 0 1k', 'ILOAD out nowhere 50m'], '.supply in=VBAT out=out load=ILOAD'));
    expect(r.errors.map((e) => e.code)).toEqual(['load-not-across-rail']);
    expect(r.errors[0]!.message).toMatch(/ILOAD.*out and nowhere/);
  });

  test('a load from out to a node other than ref that returns to it is accepted (a load across two rails)', () => {
    const r = check(follower(['RBLEED out 0 1k', 'VNEG neg 0 -5', 'RL out neg 220']));
    expect(r.ok).toBe(true);
    expect(r.errors).toEqual([]);
  });
});

describe('the .supply input source', () => {
  test('a source whose other terminal touches nothing: connected only through ground, an error', () => {
    // VIN shares ground with the stage, but its other terminal inn touches nothing else;
    // the stage is in fact fed by VBAT.
    const r = check(follower(['RL out 0 100', 'VIN inn 0 12'], '.supply in=VIN out=out load=RL'));
    expect(r.ok).toBe(false);
    expect(r.errors.map((e) => e.code)).toEqual(['input-not-connected']);
    const e = r.errors[0]!;
    expect(e.pos?.line).toBe(10);
    expect(e.message).toMatch(/VIN connects inn and 0/);
    expect(e.message).toMatch(/\bout\b/);
    expect(e.expected).toMatch(/V element that feeds the stage/);
  });

  test('a source hung from one node of the stage by both its terminals: an error', () => {
    // VAUX and RAUX both run from a to ref: whatever VAUX drives returns through ref alone.
    const r = check(follower(['RL out 0 100', 'VAUX a ref 1', 'RAUX a ref 1k'], '.supply in=VAUX out=out load=RL'));
    expect(r.errors.map((e) => e.code)).toEqual(['input-not-connected']);
  });

  test('a source in a separate circuit that shares no node with the stage: an error', () => {
    const r = check(follower(['RL out 0 100', 'VX p q 3', 'RX p q 1k', 'RQ q 0 1k'], '.supply in=VX out=out load=RL'));
    expect(r.errors.map((e) => e.code)).toEqual(['input-not-connected']);
  });

  test('stages that are connected pass: the follower, unloaded, negative, floating secondary with a bridge, ref other than ground', () => {
    expect(check(follower(['RL out 0 100'])).errors).toEqual([]);
    expect(check(follower([], '.supply in=VBAT out=out')).errors).toEqual([]);
    const negative = ['Negative rail', 'VBAT 0 nin 12', 'RB ref nin 680', 'DZ ref 0 ZREF', 'Q1 nin ref out PPASS', 'RL 0 out 100', '.model ZREF D (BV=5.6)', '.model PPASS PNP (BF=150)', '.supply in=VBAT out=out load=RL', '.end'];
    expect(check(negative.join('\n')).errors).toEqual([]);
    const bridge = ['Bridge', 'VSEC w b sin(0 17 50)', 'D1 w res DB', 'D2 b res DB', 'D3 0 w DB', 'D4 0 b DB', 'C1 res 0 1m', 'RL res 0 100', '.model DB D', '.supply in=VSEC out=res load=RL', '.end'];
    expect(check(bridge.join('\n')).errors).toEqual([]);
    const floating = ['Referenced to its own return', 'VIN in 0 10', 'R1 in p 1k', 'R2 p m 1k', 'R3 m 0 1k', '.supply in=VIN out=p ref=m', '.end'];
    expect(check(floating.join('\n')).errors).toEqual([]);
  });

  test('controlled sources connect: an E reading the source, an F carrying its current', () => {
    const e = ['Buffered', 'VIN a 0 5', 'RA a 0 1k', 'E1 out 0 a 0 2', 'RL out 0 1k', '.supply in=VIN out=out load=RL', '.end'];
    expect(check(e.join('\n')).errors).toEqual([]);
    const f = ['Mirrored', 'VIN a 0 5', 'RA a 0 1k', 'F1 0 out VIN 2', 'RL out 0 1k', '.supply in=VIN out=out load=RL', '.end'];
    expect(check(f.join('\n')).errors).toEqual([]);
  });

  test('the errors stop the run before any analysis, and the command line exits 2 naming the .supply line', async () => {
    const text = follower(['RL out 0 100', 'VIN inn 0 12'], '.supply in=VIN out=out load=RL') + '\n';
    const r = runNetlist(text, { file: 'c.cir' });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.errors.map((e) => e.code)).toEqual(['input-not-connected']);
    const dir = freshDir('connections');
    const { 'main.cir': path } = writeFiles(dir, { 'main.cir': text });
    const run = await cli(['run', path!]);
    expect(run.status).toBe(2);
    expect(run.err).toMatch(/main\.cir:10:1: error: .*VIN/);
    expect(run.err).toMatch(/expected: /);
  });
});

describe('the examples', () => {
  const dir = fileURLToPath(new URL('../../../examples/', import.meta.url));
  for (const file of readdirSync(dir).filter((f) => f.endsWith('.cir'))) {
    test(`${file}: no connection error and no single-connection warning`, () => {
      const parsed = readNetlistFile(dir + file);
      expect(parsed.ok).toBe(true);
      if (!parsed.ok) return;
      const r = elaborate(parsed.netlist);
      expect(r.ok).toBe(true);
      expect(r.warnings.filter((w) => w.code === 'single-connection')).toEqual([]);
    });
  }
});
