export * from './mesh.js';
