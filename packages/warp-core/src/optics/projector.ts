/** Pinhole projector with lens shift (DESIGN.md "Projector model"): pixel → ray and its inverse. */
import type { Vec3, ReadonlyVec3 } from '../math.js';
import { projectorBasis, type ProjectorBasis, type ProjectorModel } from '../rig/model.js';

/** Precomputed constants for mapping pixels of one projector. */
export interface ProjectorFrame extends ProjectorBasis {
  origin: Vec3;
  width: number;
  height: number;
  throwRatio: number;
  shiftX: number;
  shiftY: number;
}

export function projectorFrame(p: ProjectorModel): ProjectorFrame {
  const basis = projectorBasis(p);
  return {
    ...basis,
    origin: [p.position[0], p.position[1], p.position[2]],
    width: p.resolution[0],
    height: p.resolution[1],
    throwRatio: p.throwRatio,
    shiftX: p.lensShift[0],
    shiftY: p.lensShift[1],
  };
}

/**
 * Unit ray direction through continuous pixel coordinate (x, y), written to `out`:
 * a = (x/W − 0.5 + sx)/T, b = ((0.5 − y/H) + sy)·(H/W)/T, d = normalize(forward + a·right + b·up).
 */
export function pixelToRay(out: Vec3, f: ProjectorFrame, x: number, y: number): Vec3 {
  const a = (x / f.width - 0.5 + f.shiftX) / f.throwRatio;
  const b = ((0.5 - y / f.height + f.shiftY) * (f.height / f.width)) / f.throwRatio;
  const dx = f.forward[0] + a * f.right[0] + b * f.up[0];
  const dy = f.forward[1] + a * f.right[1] + b * f.up[1];
  const dz = f.forward[2] + a * f.right[2] + b * f.up[2];
  const l = Math.sqrt(dx * dx + dy * dy + dz * dz);
  out[0] = dx / l;
  out[1] = dy / l;
  out[2] = dz / l;
  return out;
}

/**
 * The inverse of pixelToRay: the continuous pixel coordinate whose ray points along d (any length),
 * or null when d points behind the lens. The result may lie outside the frame.
 */
export function rayToPixel(f: ProjectorFrame, d: ReadonlyVec3): [number, number] | null {
  const df = d[0] * f.forward[0] + d[1] * f.forward[1] + d[2] * f.forward[2];
  if (!(df > 1e-12)) return null;
  const a = (d[0] * f.right[0] + d[1] * f.right[1] + d[2] * f.right[2]) / df;
  const b = (d[0] * f.up[0] + d[1] * f.up[1] + d[2] * f.up[2]) / df;
  const x = f.width * (a * f.throwRatio + 0.5 - f.shiftX);
  const y = f.height * (0.5 + f.shiftY - (b * f.throwRatio * f.width) / f.height);
  return [x, y];
}

/** True when (x, y) lies inside the frame [0, W] × [0, H]. */
export function insideFrame(f: ProjectorFrame, x: number, y: number, margin = 0): boolean {
  return x >= -margin && x <= f.width + margin && y >= -margin && y <= f.height + margin;
}
