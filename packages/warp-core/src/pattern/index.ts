export * from './raster.js';
export * from './digit-font.js';
export * from './dome-master.js';
export * from './markers.js';
