/**
 * The command line's commands and options (docs/output.md, Exit status: exit
 * status 0 when every limit passes, 1 when one fails, 2 when the netlist
 * has an error; the message on standard error). Help asked for goes to
 * standard output with exit 0; no command at all prints it on standard
 * error with exit 2; a mistake on the command line is exit 2 with a
 * message naming the word and saying what was expected.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, test } from 'vitest';
import { cli, netlistFile, STACK_LINE } from './support.js';

const DIVIDER = 'Bench divider\nV1 in 0 12\nR1 in out 3k\nR2 out 0 1k\n.op\n';

describe('help', () => {
  test.each([
    [['--help']], [['-h']], [['help']], [['help', 'run']], [['--help', 'run']], [['run', '--help']], [['help', 'demo']], [['demo', '--help']], [['run', '-h']], [['help', 'model']], [['model', '--help']],
  ])('railcheck %j prints usage and exits 0', async (argv) => {
    const run = await cli(argv);
    expect(run.status).toBe(0);
    expect(run.out).toMatch(/usage/i);
    expect(run.err).toBe('');
  });

  test('each help names its own command and options', async () => {
    expect((await cli(['--help'])).out).toMatch(/railcheck run FILE[\s\S]*railcheck demo[\s\S]*railcheck model TYPE KEY=VALUE[\s\S]*railcheck model FILE MODELNAME[\s\S]*railcheck help/);
    const run = (await cli(['help', 'run'])).out;
    expect(run).toMatch(/railcheck run FILE/);
    expect(run).toContain('--json');
    expect(run).toContain('--allow-outside-includes');
    expect((await cli(['demo', '--help'])).out).toMatch(/railcheck demo/);
    // The general help gives the exit statuses of docs/output.md.
    expect((await cli(['help'])).out).toMatch(/0[^\n]*1[^\n]*limit[^\n]*2/);
  });

  test('--help wins over a file argument', async () => {
    const run = await cli(['run', netlistFile(DIVIDER), '--help']);
    expect(run.status).toBe(0);
    expect(run.out).toMatch(/usage/);
  });
});

describe('mistakes on the command line exit 2 with a message', () => {
  test.each([
    ['unknown command', ['simulate', 'x.cir'], /unknown command 'simulate'/],
    ['unknown option on run', ['run', 'x.cir', '--fast'], /unknown option '--fast'.*--json/],
    ['unknown short option on run', ['run', 'x.cir', '-q'], /unknown option '-q'.*-j\/--json/],
    ['unknown option on demo', ['demo', '--csv'], /unknown option '--csv'/],
    ['unknown option before a command', ['--json', 'run', 'x.cir'], /unknown option '--json'.*after the command/],
    ['unknown short option before a command', ['-z'], /unknown option '-z'/],
    ['a value given to a flag that takes none', ['run', 'x.cir', '--json=yes'], /'--json' takes no value/],
    ['an option where --csv wants its file name', ['run', 'x.cir', '--csv', '--json'], /'--csv' needs a value.*followed by the option '--json'/],
    ['the short form the same', ['run', 'x.cir', '-c', '-j'], /'-c' needs a value.*followed by the option '-j'/],
    ['--csv at the end', ['run', 'x.cir', '--csv'], /'--csv' needs a value \(OUT\.csv\)/],
    ['--csv with an empty value', ['run', 'x.cir', '--csv='], /'--csv' needs a value/],
    ['an option given twice', ['run', 'x.cir', '--csv', 'a.csv', '-c', 'b.csv'], /'-c' is given twice/],
    ['--version with more', ['--version', 'run'], /--version: takes nothing else/],
    ['run without a file', ['run'], /expected one netlist FILE/],
    ['run with two files', ['run', 'a.cir', 'b.cir'], /expected one netlist FILE, got 2: a\.cir b\.cir/],
    ['demo with a file', ['demo', 'x.cir'], /takes no file/],
    ['help on an unknown command', ['help', 'simulate'], /simulate/],
    ['no command at all: help on standard error', [], /no command given[\s\S]*usage:/],
  ])('%s', async (_name, argv, message) => {
    const run = await cli(argv);
    expect(run.status).toBe(2);
    expect(run.err).toMatch(message);
    expect(run.out).toBe('');
    expect(run.err).not.toMatch(STACK_LINE);
  });
});

describe('short options and --version', () => {
  test('-j before the file is --json, not a second file', async () => {
    const run = await cli(['run', '-j', netlistFile(DIVIDER)]);
    expect(run.err).toBe('');
    expect(run.status).toBe(0);
    // Ohm's law: 12 V over 3k + 1k puts out at 3 V; observed exact, bound 2 eps.
    const out = (JSON.parse(run.out) as { op: { nodes: Record<string, number> } }).op.nodes['out']!;
    expect(Math.abs(out - 3)).toBeLessThanOrEqual(2 * Number.EPSILON * 3);
  });

  test.each([[['--version']], [['-V']]])('railcheck %j prints the CLI package version and exits 0', async (argv) => {
    const pkg = JSON.parse(readFileSync(new URL('../../packages/cli/package.json', import.meta.url), 'utf8')) as { version: string };
    const run = await cli(argv);
    expect(run.status).toBe(0);
    expect(run.out.trim()).toBe(pkg.version);
    expect(run.err).toBe('');
  });
});

describe('run and demo', () => {
  test('run FILE exits 0 and reports on standard output only', async () => {
    const run = await cli(['run', netlistFile(DIVIDER)]);
    expect(run.status).toBe(0);
    expect(run.out).toContain('Bench divider');
    expect(run.err).toBe('');
  });

  test('run of a broken netlist exits 2 and prints nothing on standard output', async () => {
    const file = netlistFile('Broken\nV1 in 0 12\nR1 in out\n');
    const run = await cli(['run', file]);
    expect(run.status).toBe(2);
    expect(run.out).toBe('');
    expect(run.err).toContain(`${file}:3:`);
  });

  test('demo exits 0 and reports the example stage (its title, its nodes and elements)', async () => {
    const run = await cli(['demo']);
    expect(run.status).toBe(0);
    expect(run.out).toMatch(/Weather-station sensor rail/);
    expect(run.out).toContain('sensor-rail-follower.cir');
    for (const name of ['VBAT', 'Q1', 'DZ', 'ILOAD']) expect(run.out).toContain(name);
  });

  test('demo --json is one JSON object about the same stage', async () => {
    const run = await cli(['demo', '--json']);
    expect(run.status).toBe(0);
    const j = JSON.parse(run.out) as { title: string; op: { nodes: Record<string, number>; currents: Record<string, number> } };
    expect(j.title).toMatch(/Weather-station/);
    expect(Object.keys(j.op.nodes)).toEqual(expect.arrayContaining(['in', 'ref', 'out']));
    // The demo's battery is 12 V (examples/sensor-rail-follower.cir, .param vbat=12).
    // Observed 0; bound 2·eps·12 V.
    expect(Math.abs(j.op.nodes['in']! - 12)).toBeLessThanOrEqual(2 * Number.EPSILON * 12);
    expect(Object.keys(j.op.currents)).toEqual(expect.arrayContaining(['Q1.c', 'Q1.b', 'Q1.e']));
  });
});
