/** Worker thread: receives the shared map once, then frame jobs one at a time. */
import { parentPort, workerData } from 'node:worker_threads';
import type { ImageBuffer, RemapMap } from '@skyfold/warp-core';
import { runFrameJob, type FrameJob, type WarpSettings } from './job.js';

interface Init {
  map: { width: number; height: number; x: SharedArrayBuffer; y: SharedArrayBuffer; gain: SharedArrayBuffer };
  settings: WarpSettings;
}

const init = workerData as Init;
const map: RemapMap = {
  width: init.map.width,
  height: init.map.height,
  x: new Float32Array(init.map.x),
  y: new Float32Array(init.map.y),
  gain: new Float32Array(init.map.gain),
};
const scratch: { out?: ImageBuffer } = {};

parentPort!.on('message', (job: FrameJob) => {
  void runFrameJob(job, map, init.settings, scratch).then((outcome) => parentPort!.postMessage(outcome));
});
