#!/usr/bin/env node
// `npm run bench`: every skyfold benchmark, measured side by side in one run, reported as ratios.
// Figures go to standard output and bench-out/results.json. `--quick` for fewer repetitions.
import { mkdirSync, writeFileSync } from 'node:fs';
import { cpus, totalmem } from 'node:os';
import { benchTrace } from './trace.mjs';
import { benchRemap } from './remap.mjs';
import { benchFrame } from './frame.mjs';

const quick = process.argv.includes('--quick');
const machine = `${cpus()[0]?.model ?? 'unknown CPU'}, ${cpus().length} cores, ${(totalmem() / 2 ** 30).toFixed(0)} GiB, Node ${process.version}`;
console.log(`skyfold bench on ${machine}${quick ? ' (quick)' : ''}\n`);

const trace = await benchTrace({ quick });
console.log(`trace     ${trace.frame}: ${trace.medianMs.toFixed(1)} ms per frame = ${(trace.raysPerSecond / 1e6).toFixed(1)} million rays/s on one core (aim: >= 10)`);

// the whole-frame figures first, on a fresh heap; then the kernels against OpenCV
const frame = await benchFrame({ quick });
const remapRows = await benchRemap({ quick });
for (const r of remapRows.rows) {
  if (r.skipped) {
    console.log(`remap     ${r.name}: skipped (${r.skipped})`);
    continue;
  }
  let line = `remap     ${r.name}: ${r.ms.toFixed(1)} ms (${r.case})`;
  if (r.ratio !== undefined) line += ` -> skyfold bilinear / OpenCV = ${r.ratio.toFixed(2)}x (aim: <= 1.5x)`;
  console.log(line);
}
for (const r of frame) {
  console.log(`frame     ${r.filter}: decode+warp+encode ${r.fullMs.toFixed(0)} ms vs decode+encode ${r.ioMs.toFixed(0)} ms = ${r.ratio.toFixed(2)}x (aim: <= 1.2x; warp alone ${r.remapMs.toFixed(0)} ms)`);
}
mkdirSync(new URL('../bench-out/', import.meta.url), { recursive: true });
writeFileSync(new URL('../bench-out/results.json', import.meta.url), JSON.stringify({ machine, date: new Date().toISOString(), trace, remap: remapRows, frame }, null, 2) + '\n');
console.log('\nwrote bench-out/results.json');
