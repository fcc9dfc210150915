/** Warnings for rigs that work but are probably not what was meant. */
import { allocGridOutput, HitKind, Tracer } from '../trace.js';
import { rayToPixel, insideFrame } from '../optics/projector.js';
import { sub } from '../math.js';
import type { Rig } from './model.js';

/** Human-readable warnings (empty when the rig looks sound). */
export function rigWarnings(rig: Rig): string[] {
  const warnings: string[] = [];
  const tracer = new Tracer(rig);
  const f = tracer.frame;
  const nx = 97;
  const ny = 61;
  const xs = Array.from({ length: nx }, (_, i) => ((i + 0.5) * f.width) / nx);
  const ys = Array.from({ length: ny }, (_, j) => ((j + 0.5) * f.height) / ny);
  const g = tracer.grid(xs, ys, allocGridOutput(nx, ny));
  let hits = 0;
  let dome = 0;
  for (const k of g.kind) {
    if (k !== HitKind.MirrorMiss) hits++; // open counts: it reached the mirror
    if (k === HitKind.Dome) dome++;
  }
  if (hits === 0) {
    const c = rayToPixel(f, sub(rig.mirror.center, f.origin));
    const centreInFrame = c !== null && insideFrame(f, c[0], c[1]);
    if (!centreInFrame) {
      warnings.push("the projector's frame misses the mirror entirely: check projector.lookAt, projector.lensShift and mirror.center");
    } else {
      warnings.push("the projector's frame sees only the back of the mirror or its mount (outside the reflective cap): check mirror.axis and mirror.capAngle");
    }
  } else if (dome === 0) {
    warnings.push('no projector pixel reaches the dome above the springline: check the mirror axis and the projector aim');
  }
  return warnings;
}
