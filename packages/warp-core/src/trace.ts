/**
 * The forward trace (DESIGN.md "The job, in one picture"): projector pixel → ray → first hit on the
 * mirror sphere (cap test) → reflection → dome sphere → direction from the content's eye → fisheye.
 */
import { rayDomeExit } from './optics/dome.js';
import { directionToFisheye, worldToContent } from './optics/fisheye.js';
import { azAltFromDirection, type Vec3 } from './math.js';
import { capCosine, mirrorNormal, onCap, raySphereFirstHit, reflect } from './optics/mirror.js';
import { pixelToRay, projectorFrame, type ProjectorFrame } from './optics/projector.js';
import type { Rig } from './rig/model.js';
import { rayTriangle, type TriangleBvh } from './optics/triangle-bvh.js';

/**
 * What a projector pixel's light does. Numeric codes are used in typed arrays. The trace gives the first
 * four; the report's analysis (`classifyHit`, analysis/sample.ts) splits Dome into Lit, Shadow and
 * OutsideContent and counts Open as BelowHorizon, so its grids hold neither Dome nor Open.
 */
export const HitKind = { MirrorMiss: 0, Dome: 1, BelowHorizon: 2, Open: 3, Lit: 4, Shadow: 5, OutsideContent: 6 } as const;
export type HitKindCode = (typeof HitKind)[keyof typeof HitKind];
export type HitName = 'mirror-miss' | 'dome' | 'below-horizon' | 'open';

/** True for the kinds whose light lands on a surface (dome or below the horizon) and so has a fisheye (u, v). */
export function landsOnDome(kind: number): boolean {
  return kind === HitKind.Dome || kind === HitKind.BelowHorizon;
}

export type TraceResult =
  | { kind: 'mirror-miss'; ray: Vec3 }
  /** Reflected, but the ray meets no triangle of an as-built dome (a door, a gap, the floor under a skirt). */
  | { kind: 'open'; ray: Vec3; mirrorPoint: Vec3; mirrorDistance: number; reflected: Vec3 }
  | {
      kind: 'dome' | 'below-horizon';
      /** Unit ray leaving the lens. */
      ray: Vec3;
      /** Where it meets the mirror, and the distance from the lens. */
      mirrorPoint: Vec3;
      mirrorDistance: number;
      /** Unit reflected ray. */
      reflected: Vec3;
      /** Where the reflected ray meets the dome sphere (continued below the springline), metres. */
      domePoint: Vec3;
      /** Unit direction of the dome point from the content's eye. */
      direction: Vec3;
      /** Radians: azimuth in [0, 2π), altitude above the springline plane. */
      azimuth: number;
      altitude: number;
      fisheye: [number, number];
    };

/** A rig prepared for tracing: constants computed once. */
export class Tracer {
  readonly frame: ProjectorFrame;
  /**
   * On an as-built dome, true when the mesh is convex and holds the whole mirror sphere strictly inside:
   * the reflected ray meets it at most once, so the first triangle found is the hit (no nearer one to seek).
   */
  readonly meshHoldsMirror: boolean;
  /**
   * What the grid kernel traces against: the mesh closed by portals at its openings when that is convex
   * and holds the mirror (then triangles from `portalStart` on are openings), else the mesh itself.
   */
  private readonly gridBvh: TriangleBvh | undefined;
  /** On an as-built dome, true when the mesh is convex and holds the content's eye strictly inside. */
  readonly meshHoldsEye: boolean;
  private readonly portalStart: number;
  constructor(readonly rig: Rig) {
    this.frame = projectorFrame(rig.projector);
    const mesh = rig.dome.mesh;
    const [cx, cy, cz] = rig.mirror.center;
    this.meshHoldsMirror = mesh?.encloses(rig.mirror.center, rig.mirror.radius) ?? false;
    this.meshHoldsEye = mesh?.encloses(rig.content.eye, 0) ?? false;
    const closed = this.meshHoldsMirror ? mesh!.closedConvex() : null;
    if (closed && closed !== mesh!.bvh && closed.containsBall(cx, cy, cz, rig.mirror.radius)) {
      this.gridBvh = closed;
      this.portalStart = mesh!.triangleCount;
    } else {
      this.gridBvh = mesh?.bvh;
      this.portalStart = Infinity;
    }
  }

  /** Traces one continuous pixel coordinate, with every intermediate quantity. */
  pixel(x: number, y: number): TraceResult {
    const { mirror, content } = this.rig;
    const dome = this.rig.dome;
    const ray = pixelToRay([0, 0, 0], this.frame, x, y);
    const P = this.frame.origin;
    const t = raySphereFirstHit(P, ray, mirror.center, mirror.radius);
    if (t < 0) return { kind: 'mirror-miss', ray };
    const X: Vec3 = [P[0] + t * ray[0], P[1] + t * ray[1], P[2] + t * ray[2]];
    if (!onCap(mirror, X)) return { kind: 'mirror-miss', ray }; // blocked by the mount / back of the mirror
    const n = mirrorNormal([0, 0, 0], mirror, X);
    const r = reflect([0, 0, 0], ray, n);
    const s = dome.mesh ? dome.mesh.firstHit(X, r, this.meshHoldsMirror) : rayDomeExit(X, r, dome.radius);
    if (s < 0) return { kind: 'open', ray, mirrorPoint: X, mirrorDistance: t, reflected: r };
    const D: Vec3 = [X[0] + s * r[0], X[1] + s * r[1], X[2] + s * r[2]];
    const e = content.eye;
    const w: Vec3 = [D[0] - e[0], D[1] - e[1], D[2] - e[2]];
    const wl = Math.hypot(w[0], w[1], w[2]);
    w[0] /= wl;
    w[1] /= wl;
    w[2] /= wl;
    const [azimuth, altitude] = azAltFromDirection(w);
    const fisheye = directionToFisheye([0, 0], worldToContent([0, 0, 0], w, content.azimuth ?? 0), content.fov);
    return {
      kind: D[2] >= 0 ? 'dome' : 'below-horizon',
      ray,
      mirrorPoint: X,
      mirrorDistance: t,
      reflected: r,
      domePoint: D,
      direction: w,
      azimuth,
      altitude,
      fisheye,
    };
  }

  /**
   * Traces the separable grid of points (xs[i], ys[j]) into typed arrays, row-major (index j·nx + i).
   * The hot loop allocates nothing. Pixels that miss the mirror get u = v = NaN and kind MirrorMiss; on an
   * as-built dome, reflected rays that meet no triangle get u = v = NaN and kind Open.
   */
  grid(xs: ArrayLike<number>, ys: ArrayLike<number>, out: GridOutput): GridOutput {
    const nx = xs.length;
    const ny = ys.length;
    const f = this.frame;
    const { mirror, content } = this.rig;
    const dome = this.rig.dome;
    const W = f.width;
    const H = f.height;
    const T = f.throwRatio;
    // Per-column part of the unnormalized ray: forward + a·right.
    const cx = new Float64Array(nx);
    const cy = new Float64Array(nx);
    const cz = new Float64Array(nx);
    for (let i = 0; i < nx; i++) {
      const a = (xs[i] / W - 0.5 + f.shiftX) / T;
      cx[i] = f.forward[0] + a * f.right[0];
      cy[i] = f.forward[1] + a * f.right[1];
      cz[i] = f.forward[2] + a * f.right[2];
    }
    const [px, py, pz] = f.origin;
    const [mcx, mcy, mcz] = mirror.center;
    const mr = mirror.radius;
    const invR = 1 / mr;
    const [ax, ay, az] = mirror.axis;
    const capCos = capCosine(mirror); // onCap's rule, on the unit normal the loop already has
    const ox = px - mcx;
    const oy = py - mcy;
    const oz = pz - mcz;
    const cc = ox * ox + oy * oy + oz * oz - mr * mr;
    const R2 = dome.radius * dome.radius;
    const bvh = this.gridBvh;
    const anyHit = this.meshHoldsMirror;
    const portalStart = this.portalStart;
    const tri = bvh?.triangles ?? new Float64Array(0);
    let hint = -1;
    let hintOpen = false;
    const hintUv = new Float64Array(2);
    const [ex, ey, ez] = content.eye;
    const invFov = 1 / content.fov;
    // content.azimuth: the fisheye is read in the content's frame, turned by −azimuth about +z (fisheye.ts worldToContent)
    const turnC = Math.cos(content.azimuth ?? 0);
    const turnS = Math.sin(content.azimuth ?? 0);
    const { u, v, kind, point, mirrorDistance } = out;
    const NaN_ = Number.NaN;
    for (let j = 0; j < ny; j++) {
      const b = ((0.5 - ys[j] / H + f.shiftY) * (H / W)) / T;
      const bx = b * f.up[0];
      const by = b * f.up[1];
      const bz = b * f.up[2];
      let k = j * nx;
      for (let i = 0; i < nx; i++, k++) {
        let dx = cx[i] + bx;
        let dy = cy[i] + by;
        let dz = cz[i] + bz;
        const il = 1 / Math.sqrt(dx * dx + dy * dy + dz * dz);
        dx *= il;
        dy *= il;
        dz *= il;
        // first hit on the mirror sphere (the lens is outside it, so both roots share a sign)
        const hb = ox * dx + oy * dy + oz * dz;
        const disc = hb * hb - cc;
        const t = -hb - Math.sqrt(disc);
        if (!(disc >= 0 && t >= 0)) {
          kind[k] = 0;
          u[k] = NaN_;
          v[k] = NaN_;
          continue;
        }
        const nx_ = (ox + t * dx) * invR;
        const ny_ = (oy + t * dy) * invR;
        const nz_ = (oz + t * dz) * invR;
        if (nx_ * ax + ny_ * ay + nz_ * az < capCos) {
          kind[k] = 0;
          u[k] = NaN_;
          v[k] = NaN_;
          continue;
        }
        const Xx = px + t * dx;
        const Xy = py + t * dy;
        const Xz = pz + t * dz;
        const dn2 = 2 * (dx * nx_ + dy * ny_ + dz * nz_);
        const rx = dx - dn2 * nx_;
        const ry = dy - dn2 * ny_;
        const rz = dz - dn2 * nz_;
        let s: number;
        if (bvh === undefined) {
          const sb = Xx * rx + Xy * ry + Xz * rz;
          s = -sb + Math.sqrt(sb * sb - (Xx * Xx + Xy * Xy + Xz * Xz - R2));
        } else {
          // from inside a convex mesh the last pixel's triangle usually answers: tested first, before the BVH
          s = -1;
          let open = false;
          if (anyHit && hint >= 0) {
            s = rayTriangle(tri, 9 * hint, Xx, Xy, Xz, rx, ry, rz, 1e-9, Infinity, 0, hintUv);
            if (s >= 0) open = hintOpen;
          }
          if (s < 0) {
            s = bvh.firstHit(Xx, Xy, Xz, rx, ry, rz, 1e-9, Infinity, anyHit);
            open = s < 0 || bvh.hitTriangle >= portalStart;
            if (s >= 0) {
              hint = bvh.hitSlot;
              hintOpen = open;
            }
          }
          if (open) {
            kind[k] = 3;
            u[k] = NaN_;
            v[k] = NaN_;
            if (mirrorDistance !== undefined) mirrorDistance[k] = t;
            if (point !== undefined) {
              // where the light would meet the nominal sphere: its direction, for the room's figures
              const sb = Xx * rx + Xy * ry + Xz * rz;
              const s0 = -sb + Math.sqrt(Math.max(0, sb * sb - (Xx * Xx + Xy * Xy + Xz * Xz - R2)));
              point[3 * k] = Xx + s0 * rx;
              point[3 * k + 1] = Xy + s0 * ry;
              point[3 * k + 2] = Xz + s0 * rz;
            }
            continue;
          }
        }
        const Dx = Xx + s * rx;
        const Dy = Xy + s * ry;
        const Dz = Xz + s * rz;
        let wx = Dx - ex;
        let wy = Dy - ey;
        let wz = Dz - ez;
        const iw = 1 / Math.sqrt(wx * wx + wy * wy + wz * wz);
        wx *= iw;
        wy *= iw;
        wz *= iw;
        const h = Math.sqrt(wx * wx + wy * wy);
        // acos is fast but loses digits within a hair of the zenith and nadir: atan2 there
        const theta = wz < 0.9 && wz > -0.9 ? Math.acos(wz) : Math.atan2(h, wz);
        if (h > 1e-300) {
          const q = theta * invFov / h;
          u[k] = 0.5 + q * (wx * turnC - wy * turnS);
          v[k] = 0.5 + q * (wy * turnC + wx * turnS);
        } else {
          u[k] = 0.5;
          v[k] = theta < 1 ? 0.5 : 0.5 + theta * invFov;
        }
        kind[k] = Dz >= 0 ? 1 : 2;
        if (point !== undefined) {
          point[3 * k] = Dx;
          point[3 * k + 1] = Dy;
          point[3 * k + 2] = Dz;
        }
        if (mirrorDistance !== undefined) mirrorDistance[k] = t;
      }
    }
    return out;
  }

  /** Every pixel centre of the projector frame (or a band of rows [rowStart, rowEnd)). */
  frameGrid(options: { rowStart?: number; rowEnd?: number; float32?: boolean; points?: boolean; mirrorDistance?: boolean } = {}): GridOutput {
    const W = this.frame.width;
    const rowStart = options.rowStart ?? 0;
    const rowEnd = options.rowEnd ?? this.frame.height;
    const xs = new Float64Array(W);
    for (let i = 0; i < W; i++) xs[i] = i + 0.5;
    const ys = new Float64Array(rowEnd - rowStart);
    for (let j = rowStart; j < rowEnd; j++) ys[j - rowStart] = j + 0.5;
    const out = allocGridOutput(W, rowEnd - rowStart, options);
    return this.grid(xs, ys, out);
  }
}

/** Typed-array results of a grid trace, row-major. */
export interface GridOutput {
  cols: number;
  rows: number;
  u: Float32Array | Float64Array;
  v: Float32Array | Float64Array;
  /** HitKind codes. */
  kind: Uint8Array;
  /** Dome points, xyz per entry (optional); for Open entries, where the ray meets the nominal sphere. */
  point?: Float32Array | Float64Array;
  /** Lens-to-mirror distance per entry (optional). */
  mirrorDistance?: Float32Array | Float64Array;
}

export function allocGridOutput(cols: number, rows: number, options: { float32?: boolean; points?: boolean; mirrorDistance?: boolean } = {}): GridOutput {
  const n = cols * rows;
  const F = options.float32 ? Float32Array : Float64Array;
  return {
    cols,
    rows,
    u: new F(n),
    v: new F(n),
    kind: new Uint8Array(n),
    point: options.points ? new F(3 * n) : undefined,
    mirrorDistance: options.mirrorDistance ? new F(n) : undefined,
  };
}

/** Convenience: traces one pixel of a rig. */
export function tracePixel(rig: Rig, x: number, y: number): TraceResult {
  return new Tracer(rig).pixel(x, y);
}
