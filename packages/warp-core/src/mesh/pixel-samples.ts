/**
 * The mesh's values traced exactly at every projector pixel centre (x + 0.5, y + 0.5): fisheye (u, v),
 * brightness and mask, for the files that can carry one value per projector pixel (an MPCDI alpha map,
 * a full-resolution map) instead of interpolating the grid.
 *
 * The mask is the same ramp as the mesh's (edge.ts) with the narrowest half-width half a pixel: at a
 * pixel whose centre lies d pixels inside a straight edge running along its rows or columns, 0.5 + d
 * clamped to [0, 1] is the share of the pixel on the lit side; a feather widens it as on the mesh.
 */
import { DEG } from '../math.js';
import type { Rig } from '../rig/model.js';
import { Tracer, landsOnDome } from '../trace.js';
import { BAKE_DEFAULTS, type BakeOptions } from './bake.js';
import type { WarpMesh } from './mesh.js';
import { angularScaleAt, edgeRamp, edgeSegments, litTest } from './edge.js';
import { brightnessFactor, contentVisible, domeAreaOnGrid, fillUnlit, referenceArea } from './grid-samples.js';

/**
 * A mesh's values with one vertex a projector pixel centre: index k = y·width + x over the projector
 * resolution; unlit pixels carry their lit neighbours' fisheye (u, v) and brightness.
 */
export type PixelSamples = Pick<WarpMesh, 'width' | 'height' | 'u' | 'v' | 'brightness' | 'mask'>;

export type PixelSampleOptions = Pick<BakeOptions, 'brightness' | 'brightnessFloor' | 'feather'>;

/** Traces every pixel centre of the rig's projector frame: the values of {@link PixelSamples}. */
export function pixelSamples(rig: Rig, options: Partial<PixelSampleOptions> = {}): PixelSamples {
  const o = { ...BAKE_DEFAULTS, ...options };
  const tracer = new Tracer(rig);
  const { width: W, height: H } = tracer.frame;
  const n = W * H;
  const xs = Float64Array.from({ length: W }, (_, i) => i + 0.5);
  const ys = Float64Array.from({ length: H }, (_, j) => j + 0.5);
  const g = tracer.frameGrid({});
  const litAt = new Uint8Array(n);
  const traced = new Uint8Array(n);
  for (let k = 0; k < n; k++) {
    traced[k] = landsOnDome(g.kind[k]) ? 1 : 0;
    litAt[k] = contentVisible(tracer, g.u[k], g.v[k], g.kind[k]) ? 1 : 0;
  }
  const lit = litTest(tracer);
  const mask = edgeRamp(edgeSegments(lit, xs, ys, litAt), xs, ys, litAt, {
    minHalfWidth: 0.5,
    featherRad: o.feather * DEG,
    angularScale: o.feather > 0 ? angularScaleAt(tracer, lit) : undefined,
  });
  const brightness = new Float32Array(n).fill(1);
  if (o.brightness > 0) {
    const areaMax = referenceArea(tracer);
    const area = domeAreaOnGrid(tracer, xs, ys);
    const bo = { strength: o.brightness, floor: o.brightnessFloor };
    for (let k = 0; k < n; k++) brightness[k] = litAt[k] ? brightnessFactor(area[k], areaMax, bo) : 0;
    fillUnlit(W, H, litAt, brightness);
  }
  fillUnlit(W, H, traced, g.u, g.v);
  return { width: W, height: H, u: Float32Array.from(g.u), v: Float32Array.from(g.v), brightness, mask };
}
