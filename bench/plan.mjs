#!/usr/bin/env node
// `npm run bench:plan`: how long a default `plan` takes on this machine — the demo rig
// (fixtures/demo-rig.yaml, 1920 × 1200), the default fields, objective and budget (PLAN_DEFAULTS),
// each run in a process of its own; the median and the range of the runs' wall times. Writes
// bench-out/plan.json. A figure for the README, not a test: speed is never asserted.
import { spawnSync } from 'node:child_process';
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { cpus } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';

const ROOT = fileURLToPath(new URL('..', import.meta.url));
const RUNS = Number(process.env.SKYFOLD_BENCH_RUNS ?? 5);

if (process.argv[2] === '--one') {
  const { parse } = await import('yaml');
  const { planRig, PLAN_DEFAULTS, rigFromDocument } = await import('@skyfold/warp-core');
  const rig = rigFromDocument(parse(readFileSync(join(ROOT, 'fixtures/demo-rig.yaml'), 'utf8')));
  const t0 = performance.now();
  const result = planRig(rig, {});
  const seconds = (performance.now() - t0) / 1000;
  process.stdout.write(JSON.stringify({ seconds, evaluations: result.evaluations, budget: PLAN_DEFAULTS.evaluations, best: result.best[0]?.figures ?? null }) + '\n');
} else {
  const runs = [];
  for (let k = 0; k < RUNS; k++) {
    const r = spawnSync(process.execPath, [fileURLToPath(import.meta.url), '--one'], { encoding: 'utf8' });
    if (r.status !== 0) throw new Error(`bench/plan.mjs run ${k + 1}: ${r.stderr}`);
    runs.push(JSON.parse(r.stdout));
  }
  const s = runs.map((r) => r.seconds).sort((a, b) => a - b);
  const out = {
    case: 'planRig(fixtures/demo-rig.yaml) with PLAN_DEFAULTS',
    evaluations: runs[0].evaluations,
    runs: RUNS,
    medianSeconds: Number(s[Math.floor(s.length / 2)].toFixed(2)),
    rangeSeconds: [Number(s[0].toFixed(2)), Number(s.at(-1).toFixed(2))],
    machine: { cpus: cpus().length, model: cpus()[0]?.model ?? 'unknown', node: process.version },
    date: new Date().toISOString(),
  };
  mkdirSync(join(ROOT, 'bench-out'), { recursive: true });
  writeFileSync(join(ROOT, 'bench-out', 'plan.json'), JSON.stringify(out, null, 2) + '\n');
  console.log(`default plan on the demo rig: ${out.medianSeconds} s median (${out.rangeSeconds[0]}-${out.rangeSeconds[1]} s over ${RUNS} runs, ${out.evaluations} evaluations, ${out.machine.cpus} cores)`);
}
