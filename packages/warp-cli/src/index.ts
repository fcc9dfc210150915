/** @skyfold/warp-cli: the `skyfold` program, and the mesh files and rig loading it is built on. */
export { buildProgram, main, run, type RunIO } from './main.js';
export { loadRig, parseDocumentText, type LoadedRig } from './io/document-file.js';
export { decodeMesh, encodeMesh, formatFromPath, MESH_FORMATS, type MeshFormat } from './export/index.js';
export { readAnyGlb, readGlb, writeGlb, writeTriangleGlb } from './export/glb.js';
export { DEMO_RIG, starterRigText } from './demo-rig.js';
export type { BatchSummary } from './warp/summary.js';
export { findVideoTools, tryVideoTools, type VideoTools } from './video/tools.js';
export { firstOffGrid, probeVideo, type VideoInfo } from './video/probe.js';
export { contiguousRuns, planSegments, segmentFrames, shardSegments, type SegmentPlan } from './video/segments.js';
export { hdrTransferWarning } from './video/warp-video.js';
export { startLiveServer, type LiveServer, type LiveServerOptions } from './live/server.js';
