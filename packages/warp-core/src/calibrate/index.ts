export * from './matrix.js';
export * from './levenberg-marquardt.js';
export * from './trilaterate.js';
export * from './measurements.js';
export * from './fit.js';
