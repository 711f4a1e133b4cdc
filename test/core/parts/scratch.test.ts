import { readFileSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { test } from 'vitest';
import { impliedDatasheet, readModelLine } from '@railcheck/core/internal';
const dir = fileURLToPath(new URL('../../../packages/core/parts/', import.meta.url));
test('scratch', () => {
  const worst: Record<string, [number, string]> = {};
  for (const f of readdirSync(dir).filter((x) => x.endsWith('.lib'))) {
    for (const line of readFileSync(join(dir, f), 'utf8').split('\n').filter((l) => l.startsWith('.model'))) {
      const r = readModelLine(line);
      if (!r.ok) { console.log('READ', line, r.errors); continue; }
      const s = impliedDatasheet(r.card);
      if (!s.ok) { console.log('FAIL', line, s.errors.map((e) => e.message)); continue; }
      for (const v of s.values) {
        const p = r.card.params.find((q) => q.name.toUpperCase() === v.key);
        if (!p || p.value.kind !== 'number') continue;
        const rel = Math.abs(v.value - p.value.value) / Math.abs(p.value.value);
        if (rel > 1e-4) console.log(r.card.name, v.key, rel.toExponential(2));
        if (!worst[v.key] || worst[v.key]![0] < rel) worst[v.key] = [rel, r.card.name];
      }
    }
  }
  console.log(worst);
});
