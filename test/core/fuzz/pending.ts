/**
 * Netlists the fuzzer once found crashing or running past the case
 * budget, fixed by budgets (breakpoints, steps, the periodic steady
 * state's give-up rule) and value ranges (element values, figure keys).
 * The netlist fuzz test runs them as fixed cases (unless FUZZ_PENDING=0):
 * each must end as a clean result or a clean error.
 */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';

const example = (name: string): string => readFileSync(fileURLToPath(new URL(`../../../examples/${name}`, import.meta.url)), 'utf8');

/** Replaces `from` by `to` in an example (which must contain it), so a reproducer names its one change. */
function edited(name: string, ...edits: readonly (readonly [string | RegExp, string])[]): string {
  let text = example(name);
  for (const [from, to] of edits) {
    const next = text.replace(from, to);
    if (next === text) throw new Error(`pending.ts: ${String(from)} is not in examples/${name}`);
    text = next;
  }
  return text;
}

/** One reproducer: what it shows, which line of work it waits for, the netlist. */
export interface PendingCase {
  readonly what: string;
  readonly waitsFor: 'budgets' | 'value ranges';
  readonly text: string;
}

/** The reproducers, smallest first where one could be made small. */
export function pendingCases(): PendingCase[] {
  return [
    { what: 'femtosecond pulse edges over a millisecond transient (breakpoints)', waitsFor: 'budgets', text: 'femto pulse\nV1 a 0 pulse(0 1 0 1f 1f 1f 3f)\nR1 a 0 1k\n.tran 10u 1m\n.end\n' },
    { what: 'sag with 1 fs edges', waitsFor: 'budgets', text: edited('sensor-rail-follower.cir', ['.figure sag depth=30% dur=50m', '.figure sag depth=30% dur=50m edge=1f']) },
    { what: 'a 7.8 MHz mains sine over a 200 ms transient (steps)', waitsFor: 'budgets', text: edited('railway-accessory-transformer.cir', [/sin\(0 \{230\*sqrt\(2\)\} 50\)/, 'sin(0 {230*sqrt(2)} 7766639)']) },
    { what: 'tstep 8e273 beyond tstop and tmax 3.8e-221 (steps)', waitsFor: 'budgets', text: edited('railway-accessory-transformer.cir', ['.tran 0.2m 200m', '.tran 7.987076543505373e+273 655933 3.8094887296856375e-221 be']) },
    { what: 'tstep 1e9 with tstop 9.5e6 and tstart 3.8e6 on a deep hierarchy with 5e-72 ohm', waitsFor: 'budgets', text: 'Deep\n.subckt l3 p\nR1 p 0 5.072489592954173e-72\n.ends\n.tran 1e9 9474827 3800741 1\n.subckt l2 p\nX3 p l3\n.ends\n.subckt l1 p\nX2 p l2\n.ends\nV1 a 1\nX1 a l1\n' },
    { what: 'a 1 mV sine into the bridge: the steady-state search once ran about 10 s before it reported not-settled', waitsFor: 'budgets', text: edited('railway-transformer-follower.cir', ['sin(0 17 50)', 'sin(0 1m 50)']) },
    { what: 'a -1 V sine into the bridge, below its two diode drops (steady state)', waitsFor: 'budgets', text: edited('railway-transformer-follower.cir', ['sin(0 17 50)', 'sin(0 -1 50)']) },
    { what: 'the reservoir capacitor turned into a 2.2 mohm resistor and a diode to node 1e9 (steady state)', waitsFor: 'budgets', text: edited('railway-transformer-follower.cir', [/^D3 0 a DBR/m, 'D3 1e9 a DBR'], [/^CRES res 0 2200u/m, 'RRES res 0 2200u']) },
    { what: 'a 1e227 V source: its power overflows to -Infinity in the operating point', waitsFor: 'value ranges', text: 'Overflow\nV1 in 0 1e227\nR1 in 0 1k\n.op\n.end\n' },
    { what: 'a 4.8e82 ohm winding resistance on a sine-fed stage (steady state)', waitsFor: 'value ranges', text: edited('railway-transformer-follower.cir', [/^RWIND w a 0\.5/m, 'RWIND w a 4.756071372223619e+82']) },
    { what: 'a 5e292 ohm base resistor on a sine-fed stage', waitsFor: 'value ranges', text: edited('railway-transformer-follower.cir', [/^RB res ref 470/m, 'RB res ref 5.144943732852859e+292']) },
    { what: 'sag with a 1.1 MHz ripple riding on the input', waitsFor: 'value ranges', text: edited('railway-capacitance-multiplier.cir', ['.figure sag depth=10% dur=60m edge=2m ripple=0.5 freq=100', '.figure sag depth=10% dur=60m edge=2m ripple=0.5 freq=1147713']) },
  ];
}
