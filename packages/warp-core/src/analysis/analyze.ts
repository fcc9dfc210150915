/**
 * `analyzeRig`: every figure of the report from one coarse trace of the frame (a few hundred thousand
 * rays at most) and one pass of dome directions through the inverse.
 */
import type { Rig } from '../rig/model.js';
import { HitKind, Tracer } from '../trace.js';
import { brightnessFigures, type BrightnessFigures } from './brightness.js';
import { contentSolidAngle, coverageFromDirections, coverageShare, type AzimuthCoverage, type DirectionCoverageOptions } from './coverage.js';
import { focusFigures, type FocusFigures } from './focus.js';
import { facetFigures, type FacetFigures } from './facets.js';
import { cellArcmin, resolutionFigures, type ResolutionFigures } from './resolution.js';
import { safetyFigures, type SafetyFigures, type SafetyZones } from './safety.js';
import { cellMeasures, sampleFrame, type CellMeasures, type FrameSample } from './sample.js';
import { pixelFigures, spillFigures, type PixelFigures, type SpillFigures } from './spill.js';
import { roundFigure as r } from './stats.js';

export interface ReportOptions {
  /** About how many frame vertices to trace. */
  vertices: number;
  /** Times a cell on the lit region's edge is split. */
  depth: number;
  /** The dome-direction pass (coverage the inverse way, per-azimuth altitudes). */
  directions: Partial<DirectionCoverageOptions>;
  /** How the findings' text writes a length (metres, decimals); default formatLength in the rig's units. */
  lengthText?: LengthText;
}

/** Writes a length for a finding's text: metres in, the rig's units out, `digits` decimals where decimals are used. */
export type LengthText = (metres: number, digits: number) => string;

export const REPORT_DEFAULTS: Readonly<ReportOptions> = { vertices: 120_000, depth: 3, directions: {} };

export interface CoverageFigures {
  /** Share of the content's dome solid angle that is lit, from the projector grid. */
  fraction: number | null;
  /** The same by sampling dome directions through the inverse (an independent check). */
  fractionByInverse: number | null;
  /** Lit and content solid angles, steradians. */
  litSolidAngle: number | null;
  contentSolidAngle: number | null;
  /** Share of the content's dome the projector's body hides from the light; null without a body. */
  bodyShadow: number | null;
  /** Per azimuth (every 5°): lowest and highest lit altitude and the unlit gaps, degrees. */
  byAzimuth: AzimuthCoverage[];
}

export interface ReportFigures {
  rig: { name: string | null; units: string };
  coverage: CoverageFigures;
  pixels: PixelFigures;
  resolution: ResolutionFigures;
  brightness: BrightnessFigures;
  spill: SpillFigures;
  focus: FocusFigures;
  safety: SafetyFigures;
  /** On an as-built dome: how far the nominal sphere would misplace content (null on a sphere). */
  facets: FacetFigures | null;
}

export interface RigAnalysis {
  figures: ReportFigures;
  sample: FrameSample;
  cells: CellMeasures;
  /** Arcminutes per pixel per full lit cell (NaN elsewhere). */
  arcmin: Float64Array;
  safetyZones: SafetyZones | null;
}

/** Arcminutes per pixel near each vertex: the mean over its finite neighbouring cells. */
export function vertexFromCells(s: FrameSample, cellValues: Float64Array): Float64Array {
  const out = new Float64Array(s.cols * s.rows).fill(Number.NaN);
  const nc = s.cols - 1;
  for (let j = 0; j < s.rows; j++)
    for (let i = 0; i < s.cols; i++) {
      let sum = 0;
      let cnt = 0;
      for (const [ci, cj] of [[i - 1, j - 1], [i, j - 1], [i - 1, j], [i, j]]) {
        if (ci < 0 || cj < 0 || ci >= nc || cj >= s.rows - 1) continue;
        const v = cellValues[cj * nc + ci];
        if (Number.isFinite(v)) {
          sum += v;
          cnt++;
        }
      }
      if (cnt) out[j * s.cols + i] = sum / cnt;
    }
  return out;
}

/** The figures of a placement the planner ranks by: the same numbers `analyzeRig` reports. */
export interface PlacementFigures {
  coverage: { fraction: number | null; litSolidAngle: number | null; contentSolidAngle: number | null; bodyShadow: number | null };
  pixels: PixelFigures;
  resolution: ResolutionFigures;
  brightness: BrightnessFigures;
  focus: FocusFigures;
}

interface PlacementMeasure {
  tracer: Tracer;
  sample: FrameSample;
  cells: CellMeasures;
  arcmin: Float64Array;
  figures: PlacementFigures;
}

/** The projector-side part of the report: one coarse trace of the frame and its cells. */
function measurePlacement(rig: Rig, o: Pick<ReportOptions, 'vertices' | 'depth' | 'lengthText'>): PlacementMeasure {
  const tracer = new Tracer(rig);
  const sample = sampleFrame(tracer, { vertices: o.vertices });
  const cells = cellMeasures(sample, o.depth);
  const omegaC = contentSolidAngle(tracer);
  let bodyShadow: number | null = null;
  if (rig.projector.body) {
    const withShadow = cellMeasures(sample, o.depth, (f) => f === HitKind.Lit || f === HitKind.Shadow);
    bodyShadow = r((withShadow.total - cells.total) / omegaC);
  }
  const arcmin = cellArcmin(cells);
  const figures: PlacementFigures = {
    coverage: { fraction: r(coverageShare(cells.total, omegaC)), litSolidAngle: r(cells.total), contentSolidAngle: r(omegaC), bodyShadow },
    pixels: pixelFigures(sample),
    resolution: resolutionFigures(sample, cells, arcmin, omegaC),
    brightness: brightnessFigures(cells),
    focus: focusFigures(sample, vertexFromCells(sample, arcmin), o.lengthText),
  };
  return { tracer, sample, cells, arcmin, figures };
}

/** The figures `analyzeRig` gives of coverage, pixels, resolution, brightness and focus, without the rest. */
export function placementFigures(rig: Rig, options: Partial<Pick<ReportOptions, 'vertices' | 'depth'>> = {}): PlacementFigures {
  return measurePlacement(rig, { ...REPORT_DEFAULTS, ...options }).figures;
}

export function analyzeRig(rig: Rig, options: Partial<ReportOptions> = {}): RigAnalysis {
  const o = { ...REPORT_DEFAULTS, ...options };
  const { tracer, sample, cells, arcmin, figures: placed } = measurePlacement(rig, o);
  const dirs = coverageFromDirections(tracer, o.directions);
  const safety = safetyFigures(sample, o.lengthText);
  const figures: ReportFigures = {
    rig: { name: rig.name ?? null, units: rig.units },
    coverage: {
      fraction: placed.coverage.fraction,
      fractionByInverse: r(dirs.fraction),
      litSolidAngle: placed.coverage.litSolidAngle,
      contentSolidAngle: placed.coverage.contentSolidAngle,
      bodyShadow: placed.coverage.bodyShadow,
      byAzimuth: dirs.byAzimuth,
    },
    pixels: placed.pixels,
    resolution: placed.resolution,
    brightness: placed.brightness,
    spill: spillFigures(sample),
    focus: placed.focus,
    safety: safety.figures,
    facets: facetFigures(rig),
  };
  return { figures, sample, cells, arcmin, safetyZones: safety.zones };
}
