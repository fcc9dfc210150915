/** The skyfold version written into files it makes. */
export const VERSION = '0.1.0';
