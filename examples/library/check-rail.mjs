// Library use of railcheck: runs a netlist file through @railcheck/core and
// prints the first operating point's node voltages and every measured figure.
//
//   npm install @railcheck/core
//   node check-rail.mjs path/to/stage.cir
//
// Without an argument it runs the weather-station sensor rail shipped with
// @railcheck/cli (node_modules/@railcheck/cli/examples/), or, inside the
// railcheck repository, examples/sensor-rail-follower.cir.
import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { formatDiagnostic, formatSI, runNetlistFile } from '@railcheck/core';

function defaultNetlist() {
  const inRepo = fileURLToPath(new URL('../sensor-rail-follower.cir', import.meta.url));
  if (existsSync(inRepo)) return inRepo;
  return fileURLToPath(new URL('examples/sensor-rail-follower.cir', import.meta.resolve('@railcheck/cli/package.json')));
}

const file = process.argv[2] ?? defaultNetlist();
const result = runNetlistFile(file);
if (!result.ok) {
  for (const e of result.errors) console.error(formatDiagnostic(e));
  process.exit(2);
}
const { report } = result;
console.log(report.title);
const op = report.operatingPoints[0];
if (op) for (const [node, volts] of Object.entries(op.nodes)) console.log(`node ${node}: ${volts} V (${formatSI(volts, 'V')})`);
for (const [name, value] of Object.entries(report.figures?.values ?? {})) console.log(`figure ${name}: ${value}`);
