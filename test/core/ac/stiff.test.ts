/**
 * A forward-biased junction directly across an ideal source puts a
 * conductance of about 1e13 S beside the source's ±1 entries. The
 * small-signal matrix is regular (the source fixes the node: MNA definition,
 * Ho, Ruehli and Brennan 1975), so the node's response must be exactly the
 * source's ac value and the diode's small-signal current gd·1 V.
 */
import { describe, expect, it } from 'vitest';
import { runNetlist, phasorDb } from '@railcheck/core';

describe('small-signal analysis of a stiff junction across a source', () => {
  it('is solved, not reported singular', () => {
    const r = runNetlist('stiff\nV1 in 0 dc 2 ac 1\nD1 in 0 DM\nRP in out 1k\nRQ out 0 1k\n.model DM D (IS=1e-14)\n.ac dec 2 1 1meg\n.end\n');
    if (!r.ok) throw new Error(r.errors.map((e) => e.message).join('\n'));
    const ac = r.report.ac[0]!;
    for (let k = 0; k < ac.frequencies.length; k++) {
      // Observed 0 dB exactly; bound 2e-15 dB (two ulps of |V|).
      expect(Math.abs(phasorDb(ac.nodes.in!.re[k]!, ac.nodes.in!.im[k]!))).toBeLessThan(2e-15);
      // The divider behind the source halves it (Ohm's law): observed exact; bound 2·eps·0.5.
      expect(Math.abs(ac.nodes.out!.re[k]! - 0.5)).toBeLessThanOrEqual(2 * Number.EPSILON * 0.5);
    }
  });
});
