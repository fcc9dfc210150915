export * from './types.js';
export * from './remap.js';
export { buildPyramid, pyramidDepth, type BuildPyramidOptions, type SourcePyramid } from './pyramid.js';
export * from '../srgb.js';
