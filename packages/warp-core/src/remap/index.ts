export * from './types.js';
export * from './remap.js';
export * from '../srgb.js';
