// Rays per second of the whole-frame trace on one core (the demo rig, 1920x1200, every pixel centre).
import { readFileSync } from 'node:fs';
import { parse } from 'yaml';
import { rigFromDocument, Tracer } from '@skyfold/warp-core';

export async function benchTrace({ quick = false } = {}) {
  const rig = rigFromDocument(parse(readFileSync(new URL('../fixtures/demo-rig.yaml', import.meta.url), 'utf8')));
  const tracer = new Tracer(rig);
  const [W, H] = rig.projector.resolution;
  const runs = quick ? 3 : 7;
  const times = [];
  tracer.frameGrid({ float32: true }); // warm up
  for (let i = 0; i < runs; i++) {
    const t0 = performance.now();
    tracer.frameGrid({ float32: true });
    times.push(performance.now() - t0);
  }
  times.sort((a, b) => a - b);
  const ms = times[Math.floor(runs / 2)];
  const raysPerSecond = (W * H) / (ms / 1000);
  return { frame: `${W}x${H}`, medianMs: ms, raysPerSecond };
}

if (import.meta.url === `file://${process.argv[1]}`) {
  const r = await benchTrace();
  console.log(`trace: ${r.frame} in ${r.medianMs.toFixed(1)} ms = ${(r.raysPerSecond / 1e6).toFixed(1)} million rays/s (one core)`);
}
