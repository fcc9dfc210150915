export * from './image.js';
export * from './font.js';
export * from './colormap.js';
export * from './scale-bar.js';
