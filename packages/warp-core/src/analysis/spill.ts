/**
 * Where the frame's pixels go, and the light that does not land on the content: pixels past the
 * mirror (the direct beam continues to the back of the room), pixels reflected below the horizon
 * (onto the wall below the springline, the floor, the audience), pixels outside the content's fov.
 * The warp mesh blacks these out; a projector's black level, its menus and its splash screen still
 * send light there.
 */
import { azAltFromDirection, RAD, type Vec3 } from '../math.js';
import { landing, type Surface } from './light.js';
import { type FrameSample, vertexWeights } from './sample.js';
import { HitKind } from '../trace.js';
import { azimuthArc, roundFigure as r } from './stats.js';

export interface PixelFigures {
  /** Projector resolution. */
  resolution: [number, number];
  /** Shares of the frame's pixels (sum to 1). */
  lit: number | null;
  shadow: number | null;
  outsideContent: number | null;
  belowHorizon: number | null;
  mirrorMiss: number | null;
  /** lit + shadow + outsideContent: pixels whose light reaches the dome above the springline. */
  dome: number | null;
}

export interface SpillPart {
  /** Share of the frame's pixels. */
  share: number | null;
  /** Shares of the frame landing on each surface. */
  onDome: number | null;
  onWall: number | null;
  onFloor: number | null;
  /** Azimuth arc (degrees, from the dome centre, read clockwise) where it lands; null when none. */
  azimuths: [number, number] | null;
  /** Height range of the landing points above the floor (or the springline when dome.floor is unknown). */
  heights: [number, number] | null;
}

export interface SpillFigures {
  pastMirror: SpillPart;
  belowHorizon: SpillPart;
  outsideContent: { share: number | null };
  heightsFrom: 'floor' | 'springline';
  note: string;
}

export function pixelFigures(s: FrameSample): PixelFigures {
  const w = vertexWeights(s);
  const sums = Object.values(HitKind).map(() => 0);
  for (let k = 0; k < w.length; k++) sums[s.kind[k]] += w[k];
  return {
    resolution: [...s.tracer.rig.projector.resolution] as [number, number],
    lit: r(sums[HitKind.Lit]),
    shadow: r(sums[HitKind.Shadow]),
    outsideContent: r(sums[HitKind.OutsideContent]),
    belowHorizon: r(sums[HitKind.BelowHorizon]),
    mirrorMiss: r(sums[HitKind.MirrorMiss]),
    dome: r(sums[HitKind.Lit] + sums[HitKind.Shadow] + sums[HitKind.OutsideContent]),
  };
}

/** Landing of each vertex's stray light: past the mirror from the lens, below the horizon from the mirror. */
export function strayLandings(s: FrameSample): (({ from: Vec3 } & ReturnType<typeof landing>) | null)[] {
  const rig = s.tracer.rig;
  const P = s.tracer.frame.origin;
  const out: (({ from: Vec3 } & ReturnType<typeof landing>) | null)[] = [];
  for (let k = 0; k < s.kind.length; k++) {
    if (s.kind[k] === HitKind.MirrorMiss) {
      const d: Vec3 = [s.ray[3 * k], s.ray[3 * k + 1], s.ray[3 * k + 2]];
      out.push({ from: [P[0], P[1], P[2]], ...landing(P, d, rig.dome.radius, rig.dome.floor, rig.dome.mesh) });
    } else if (s.kind[k] === HitKind.BelowHorizon) {
      const X: Vec3 = [s.mirrorPoint[3 * k], s.mirrorPoint[3 * k + 1], s.mirrorPoint[3 * k + 2]];
      const D = [s.point[3 * k], s.point[3 * k + 1], s.point[3 * k + 2]];
      const dl = Math.hypot(D[0] - X[0], D[1] - X[1], D[2] - X[2]);
      const d: Vec3 = [(D[0] - X[0]) / dl, (D[1] - X[1]) / dl, (D[2] - X[2]) / dl];
      out.push({ from: X, ...landing(X, d, rig.dome.radius, rig.dome.floor, rig.dome.mesh) });
    } else out.push(null);
  }
  return out;
}

export function spillFigures(s: FrameSample, landings = strayLandings(s)): SpillFigures {
  const w = vertexWeights(s);
  const floor = s.tracer.rig.dome.floor;
  const part = (kind: number): SpillPart => {
    const by: Record<Surface, number> = { dome: 0, wall: 0, floor: 0 };
    let share = 0;
    const az: number[] = [];
    let hMin = Infinity;
    let hMax = -Infinity;
    for (let k = 0; k < w.length; k++) {
      const l = landings[k];
      if (s.kind[k] !== kind || l === null) continue;
      share += w[k];
      by[l.surface] += w[k];
      az.push(azAltFromDirection([l.point[0], l.point[1], 0.0])[0] * RAD);
      const h = l.point[2] + (floor ?? 0);
      hMin = Math.min(hMin, h);
      hMax = Math.max(hMax, h);
    }
    return {
      share: r(share),
      onDome: r(by.dome),
      onWall: r(by.wall),
      onFloor: r(by.floor),
      azimuths: az.length ? (azimuthArc(az)!.map((x) => r(x, 1)) as [number, number]) : null,
      heights: az.length ? [r(hMin, 3)!, r(hMax, 3)!] : null,
    };
  };
  let outside = 0;
  for (let k = 0; k < w.length; k++) if (s.kind[k] === HitKind.OutsideContent) outside += w[k];
  return {
    pastMirror: part(HitKind.MirrorMiss),
    belowHorizon: part(HitKind.BelowHorizon),
    outsideContent: { share: r(outside) },
    heightsFrom: floor === undefined ? 'springline' : 'floor',
    note: "the warp mesh blacks these pixels out, but the projector's black level, menus and splash screen still light them",
  };
}
