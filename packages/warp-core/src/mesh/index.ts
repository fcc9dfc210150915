export * from './mesh.js';
export * from './field.js';
export * from './bake.js';
export * from './pixel-map.js';
