/** Warnings for rigs that work but are probably not what was meant. */
import { allocGridOutput, HitKind, Tracer } from '../trace.js';
import { rayToPixel, insideFrame } from '../optics/projector.js';
import { sub } from '../math.js';
import type { Rig } from './model.js';
import { meshNominalRadius, openUpwardRays } from '../optics/dome-mesh.js';

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
  warnings.push(...meshWarnings(rig));
  return warnings;
}

/** A length for a warning: three significant figures, in metres. */
function metres(x: number): string {
  return `${Number(x.toPrecision(3))} m`;
}

/**
 * An as-built dome that is probably not what was meant: a size more than a fifth off `dome.radius` (the
 * wrong units, most often), or a mesh that does not cover the sky above the mirror.
 */
function meshWarnings(rig: Rig): string[] {
  const mesh = rig.dome.mesh;
  if (!mesh) return [];
  const out: string[] = [];
  const r = meshNominalRadius(mesh);
  const R = rig.dome.radius;
  if (Math.abs(r - R) > R / 5) {
    const k = r / R;
    const hint = [100, 1000, 0.01, 0.001, 0.3048, 1 / 0.3048, 0.0254, 1 / 0.0254, 12, 1 / 12].some((f) => Math.abs(k / f - 1) < 0.1)
      ? ': check the mesh\'s units (dome.meshUnits) — a factor of ' + Number(k.toPrecision(3)) + ' is a change of units'
      : ': check the mesh\'s units (dome.meshUnits) and dome.radius';
    out.push(`dome.mesh: the mesh's radius is about ${metres(r)} but dome.radius is ${metres(R)}, more than a fifth apart${hint}`);
  }
  const count = 200;
  const open = openUpwardRays(mesh, rig.mirror.center, count);
  if (open > count / 4) {
    out.push(
      `dome.mesh: the mesh does not enclose the mirror: ${Math.round((100 * open) / count)}% of the directions up from mirror.center meet no triangle (is the mesh in the rig's frame, origin at the springline centre, z up?)`,
    );
  }
  return out;
}
