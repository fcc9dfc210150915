#!/usr/bin/env node
// One measurement in a process of its own, so that no other benchmark's JIT feedback, heap or
// cache state leaks into it: `node bench/measure.mjs CASE WORKDIR REPS` prints one JSON line,
// { case, times: [ms, ...], maxRssMiB, baseRssMiB }. bench/run.mjs prepares WORKDIR (the demo rig's
// map, the show-like frame) and spawns one of these per case and round, interleaved.
//
// Every case runs one untimed warm-up, then REPS timed repetitions; `map` runs cold, once, as
// `skyfold warp` builds it, so that its peak memory is the build's own.
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import sharp from 'sharp';
import { parse } from 'yaml';
import { rigFromDocument, pixelMapFromRig, prepareArea, prepareBilinear, remap, createImageLike, geodesicDome, Tracer } from '@skyfold/warp-core';

const [name, dir, repsText] = process.argv.slice(2);
const reps = Number(repsText ?? 5);
const RIG = new URL('../fixtures/demo-rig.yaml', import.meta.url);
/** The PNG level skyfold writes by default (packages/warp-cli/src/io/image-codec.ts). */
const PNG_LEVEL = 6;

function loadRig() {
  return rigFromDocument(parse(readFileSync(RIG, 'utf8')));
}

function f32(path) {
  const b = readFileSync(path);
  return new Float32Array(b.buffer, b.byteOffset, b.byteLength / 4);
}

function loadMap(kind) {
  const info = JSON.parse(readFileSync(join(dir, 'map.json'), 'utf8'));
  return { width: info.width, height: info.height, x: f32(join(dir, 'map-x.f32')), y: f32(join(dir, `map-y.f32`)), gain: f32(join(dir, `map-${kind}.f32`)) };
}

function loadSource() {
  const info = JSON.parse(readFileSync(join(dir, 'map.json'), 'utf8'));
  const b = readFileSync(join(dir, 'src.u8'));
  return { width: info.source, height: info.source, channels: 3, data: new Uint8Array(b.buffer, b.byteOffset, b.byteLength) };
}

async function decode(path) {
  const { data, info } = await sharp(path).raw().toBuffer({ resolveWithObject: true });
  return { width: info.width, height: info.height, channels: info.channels, data: new Uint8Array(data.buffer, data.byteOffset, data.byteLength) };
}

function encode(img) {
  return sharp(img.data, { raw: { width: img.width, height: img.height, channels: img.channels } }).png({ compressionLevel: PNG_LEVEL }).toBuffer();
}

/** Each case: setup once (untimed) → the function to time. */
const CASES = {
  // the whole-frame trace of the demo rig, float32 output, one core
  trace: () => {
    const tracer = new Tracer(loadRig());
    return () => tracer.frameGrid({ float32: true });
  },
  // the same trace with the dome as built: class I geodesic meshes generated for the demo rig's dome
  // (radius 2.5 m, floor 0.5 m below the springline). A 3V 5/8 (105 triangles, the ragged base of an
  // odd frequency) and a 32V hemisphere on a skirt to the floor (10,560), both convex; the 3V on a
  // skirt is not convex and takes the full nearest-hit search.
  'trace-3v': () => meshTraceCase(3, -0.1876, false),
  'trace-32v': () => meshTraceCase(32, 0, true),
  'trace-3v-skirt': () => meshTraceCase(3, -0.1876, true),
  // the per-pixel map onto a 4096² source as `skyfold warp` builds it from a rig (trace, mask, brightness)
  map: () => {
    const rig = loadRig();
    return () => pixelMapFromRig(rig, [4096, 4096]);
  },
  // the kernels on the real map: mask only (gain 1 or 0, like cv2.remap) and with the rig's brightness
  // gain; bilinear in fixed point from the map prepared once (untimed, as skyfold warp does once per
  // run and cv2.convertMaps does for OpenCV), and the float kernel
  bilinear: () => remapCase('mask', 'bilinear', true),
  'bilinear-float': () => remapCase('mask', 'bilinear', false),
  'bilinear-gain': () => remapCase('gain', 'bilinear', true),
  // area with its footprints planned once (untimed, as skyfold warp does once per run), and without
  area: () => remapCase('gain', 'area', true),
  'area-unplanned': () => remapCase('gain', 'area', false),
  // a whole frame: decode the 4096² PNG, warp, encode the 1920×1200 PNG; and decode + encode alone
  'frame-io': () => frameCase(null),
  'frame-bilinear': () => frameCase('bilinear'),
  'frame-area': () => frameCase('area'),
  // encoding the warped 1920×1200 frame alone, at PNG (zlib) level 1 and at the default level 6
  'encode-1': () => encodeCase(1),
  'encode-6': () => encodeCase(6),
};

function meshTraceCase(frequency, cut, skirt) {
  const doc = parse(readFileSync(RIG, 'utf8'));
  const R = doc.dome.diameter / 2;
  const dome = geodesicDome({ frequency, radius: R, keepAbove: cut * R, skirtTo: skirt ? -doc.dome.floor : undefined });
  const tracer = new Tracer(rigFromDocument({ ...doc, dome: { ...doc.dome, mesh: 'generated.obj' } }, { loadMesh: () => dome }));
  return () => tracer.frameGrid({ float32: true });
}

/** Size of the last PNG an encode case wrote. */
let encodedBytes = 0;

function encodeCase(level) {
  const map = loadMap('gain');
  const img = { width: map.width, height: map.height, channels: 3, data: readFileSync(join(dir, 'warped-area.u8')) };
  return async () => {
    const png = await sharp(img.data, { raw: { width: img.width, height: img.height, channels: 3 } }).png({ compressionLevel: level }).toBuffer();
    encodedBytes = png.length;
  };
}

function remapCase(gainKind, filter, fixed) {
  const src = loadSource();
  const map = loadMap(gainKind);
  const out = createImageLike(src, map.width, map.height);
  const prepared = fixed && filter === 'bilinear' ? prepareBilinear(map, src.width, src.height, 3) : undefined;
  const areaPlan = fixed && filter === 'area' ? prepareArea(map, src.width, src.height) : undefined;
  return () => remap(src, map, { filter, out, prepared, areaPlan });
}

function frameCase(filter) {
  const path = join(dir, 'frame.png');
  const map = loadMap('gain');
  let out;
  if (!filter) {
    // decode + encode alone encodes a warped frame of the same content, so the encoder does the same work
    const still = { width: map.width, height: map.height, channels: 3, data: readFileSync(join(dir, 'warped-area.u8')) };
    return async () => {
      await decode(path);
      return encode(still);
    };
  }
  let prepared;
  let areaPlan;
  return async () => {
    const src = await decode(path);
    out ??= createImageLike(src, map.width, map.height);
    if (filter === 'bilinear') prepared ??= prepareBilinear(map, src.width, src.height, 3);
    if (filter === 'area') areaPlan ??= prepareArea(map, src.width, src.height);
    remap(src, map, { filter, out, prepared, areaPlan });
    return encode(out);
  };
}

const setup = CASES[name];
if (!setup) {
  console.error(`measure: unknown case ${name}; one of ${Object.keys(CASES).join(', ')}`);
  process.exit(2);
}
const baseRssMiB = process.memoryUsage().rss / 2 ** 20;
const fn = setup();
const cold = name === 'map';
if (!cold) await fn();
const times = [];
for (let r = 0; r < (cold ? 1 : reps); r++) {
  const t0 = performance.now();
  await fn();
  times.push(performance.now() - t0);
}
// ru_maxrss is in KiB on Linux (getrusage(2))
const maxRssMiB = process.resourceUsage().maxRSS / 1024;
const extra = name.startsWith('encode-') ? { bytes: encodedBytes } : {};
process.stdout.write(JSON.stringify({ case: name, times, maxRssMiB, baseRssMiB, ...extra }) + '\n');
