// The spread worker with a probe: each thread leaves a file named by its thread id in SPREAD_PROBE_DIR, so a test sees that the pool ran.
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { threadId } from 'node:worker_threads';
import '../../../packages/core/src/pipeline/spread-worker.js';

const dir = process.env['SPREAD_PROBE_DIR'];
if (dir) writeFileSync(join(dir, `thread-${threadId}`), '');
