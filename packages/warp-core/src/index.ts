/**
 * @skyfold/warp-core: skyfold's pure computation — the rig, the optics, the trace and its inverse, the
 * warp mesh, the remap kernels, calibration, the analysis figures and the placement search. Typed arrays
 * in and out; no files, processes or images beyond typed arrays.
 */
export { DEG, RAD, angleBetween, azAltFromDirection, directionFromAzAlt, wrapDegrees, type ReadonlyVec3, type Vec3 } from './math.js';
export { LENGTH_UNITS, LengthSyntaxError, METRES_PER_UNIT, formatLength, formatTapeLength, fromMetres, isLengthUnit, parseLengthString, toMetres, type LengthUnit } from './units.js';
export { linearToSrgb, srgbToLinear } from './srgb.js';
export { wordNotice, type Notice } from './notice.js';

export { MAX_PROJECTOR_SIDE, mirrorPole, OptionError, RigError, validateRigGeometry, type AudienceZone, type EyeBandName, type MirrorPlace, type RoomModel, type ContentModel, type DomeModel, type MirrorModel, type ProjectorBody, type ProjectorModel, type Rig } from './rig/model.js';
export { rigFromDocument, rigToDocument, shortQuote, type RigDocumentOptions } from './rig/document.js';
export { cloneRig } from './rig/clone.js';
export { rigWarnings } from './rig/warnings.js';

export { pixelToRay, rayToPixel, projectorFrame, type ProjectorFrame } from './optics/projector.js';
export { contentToWorld, directionToFisheye, fisheyeToDirection, worldToContent } from './optics/fisheye.js';
export type { FacetFigures } from './analysis/facets.js';
export { DomeMesh, type DomeMeshSource, type TriangleSoup } from './optics/dome-mesh.js';
export { MeshFileError, parseTriangleFile } from './optics/dome-mesh-files.js';
export { geodesicDome, geodesicObj, icosahedron, type GeodesicDome, type GeodesicOptions, type StrutClass, type TriangleKind } from './optics/geodesic.js';
export { HitKind, Tracer, allocGridOutput, tracePixel, type GridOutput, type HitName, type TraceResult } from './trace.js';
export { domePointSeen, locateDirection, type LocateFailure, type LocateResult } from './locate.js';

export { createMesh, meshVertexPosition, type WarpMesh } from './mesh/mesh.js';
export { BAKE_DEFAULTS, bakeMesh, checkShowsContent, type BakeOptions, type BakeResult, type MeshAccuracy } from './mesh/bake.js';
export { pixelMapFromFillLayout, pixelMapFromMesh, pixelMapFromRig, pixelMapFromTriangles, type AlphaMap, type SourceOrientation } from './mesh/pixel-map.js';
export { pixelSamples, type PixelSampleOptions, type PixelSamples } from './mesh/pixel-samples.js';
export { fillLayoutFromMesh, fillLayoutFromRig, type FillLayoutGrid } from './mesh/fill-layout.js';
export { REMAP_DEFAULTS, createImageLike, prepareArea, remap } from './remap/remap.js';
export type { PreparedArea } from './remap/area.js';
export { fixedBilinearApplies, prepareBilinear, type PreparedBilinear } from './remap/bilinear-fixed.js';
export type { ImageBuffer, RemapFilter, RemapMap } from './remap/types.js';
export { simulationMap, type SimulateOptions } from './simulate.js';

export { FREE_QUANTITIES, measurementsFromDocument, parseFreeQuantity, type FreeQuantity, type MeasurementSet } from './calibrate/measurements.js';
export { FIT_DEFAULTS, fitRig, type FitParameter, type FitResidual, type FitResult } from './calibrate/fit.js';

export { REPORT_DEFAULTS, analyzeRig, type ReportFigures, type RigAnalysis } from './analysis/analyze.js';
export { bodyCorners, segmentHitsBody } from './analysis/body.js';
export { landing } from './analysis/light.js';
export { EYE_BANDS, describeArc } from './analysis/safety.js';
export { classifyHit } from './analysis/sample.js';
export { Sorted } from './analysis/stats.js';
export { OBJECTIVE_WEIGHTS, PLAN_DEFAULTS, PLAN_MEASURES, PLAN_OBJECTIVES, dominates, planRig, type PlanMeasure, type PlanCandidate, type PlanObjective, type PlanResult } from './placement/plan.js';
export { describeMoves, MOVE_RESOLUTION, type MoveStep } from './placement/moves.js';
export { mirrorHeightSpan, SWEEP_DEFAULTS, sweepPlacement, sweepPoint, type MirrorHeightSpan, type MirrorHeightSweep, type PlacementSweep, type SweepGrid, type SweepOptions, type SweepPoint } from './placement/sweep.js';
export { EDGE_SHARE, OPEN_ROOM, ROOM_DEFAULTS, resolveRoom, type Room } from './placement/room.js';

export { DOME_PATTERN_DEFAULTS, drawDomePattern, type PatternDot } from './pattern/dome-master.js';
export { drawMarkerFrame, type Marker } from './pattern/markers.js';
export { gridCard, smoothCard, starField } from './pattern/test-card.js';
export { ADAPTIVE_DEFAULTS, bakeAdaptive, gridAsTriangles, measureTriangles, type AdaptiveBake, type AdaptiveOptions, type TriangleAccuracy, type TriangleWarpMesh } from './mesh/adaptive.js';
