/**
 * printNetlist → parseNetlist gives back an equivalent netlist (same cards
 * and values, positions and spellings aside), for random valid netlists of
 * every card kind. The property is the printer's own contract: what it
 * writes reads back to what it was given.
 */
import fc from 'fast-check';
import { describe, expect, test } from 'vitest';
import { formatDiagnostic } from '../../../packages/core/src/errors.js';
import { parseNetlist, printNetlist } from '../../../packages/core/src/netlist/index.js';
import { netlistArb } from './gen.js';
import { mustParse, seedFor, strip } from './support.js';

const seed = seedFor('roundtrip.test.ts');

describe('round trip', () => {
  test('property: generated netlist → text → netlist is equivalent', () => {
    fc.assert(
      fc.property(netlistArb, (n) => {
        const text = printNetlist(n);
        const r = parseNetlist(text, { file: n.file });
        if (!r.ok) throw new Error(`printed text does not read:\n${text}\n${r.errors.map(formatDiagnostic).join('\n')}`);
        expect(r.netlist.title).toBe(n.title);
        expect(strip(r.netlist.cards)).toEqual(strip(n.cards));
      }),
      { seed, numRuns: 400 },
    );
  });

  test('property: printing a parsed netlist is a fixed point after one pass', () => {
    fc.assert(
      fc.property(netlistArb, (n) => {
        const once = printNetlist(n);
        const twice = printNetlist(mustParse(once).netlist);
        expect(twice).toBe(once);
      }),
      { seed, numRuns: 200 },
    );
  });

  test('a hand-written stage keeps its spellings when printed', () => {
    const text = 'Weather-station sensor rail\nVBAT in 0 dc 12\nRB in ref 820 pmax=0.25\nDZ 0 ref ZREF\nQ1 in ref out NPASS\nCOUT out 0 100u\nILOAD out 0 dc 50m\n.model ZREF D (IS=1e-14 BV=5.6 IBV=5m)\n.model NPASS NPN (BF=150 VAF=90)\n.supply in=VBAT out=out load=ILOAD\n.figure sag depth=20%\n.limit sag.fall <= 100m\n.op\n.end\n';
    expect(printNetlist(mustParse(text).netlist)).toBe(text);
  });
});
