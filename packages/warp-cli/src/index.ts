export * from './export/index.js';
export { buildProgram, main } from './main.js';
export { loadRig, parseDocumentText } from './document-file.js';
export { starterRigText, DEMO_RIG } from './demo-rig.js';
