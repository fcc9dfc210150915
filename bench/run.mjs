#!/usr/bin/env node
// `npm run bench`: skyfold's speed, measured honestly on a shared machine.
//
// - Inputs: the demo rig's own per-pixel map (fixtures/demo-rig.yaml onto a 4096² dome master) and a
//   deterministic show-like frame with detail everywhere (bench/show-frame.mjs).
// - Every measurement runs in a process of its own (bench/measure.mjs, bench/opencv-remap.py), so
//   no benchmark's JIT state, heap or caches leak into another's.
// - Rounds are interleaved: each round runs every case once, in a rotated order, so that drift in
//   the machine's load hits all cases alike. A figure is the median over rounds of each process's
//   median, with the range over rounds; a ratio is taken within each round, then summarised alike.
//
// Writes bench-out/results.json and rewrites the README's performance table from it
// (scripts/bench-table.mjs). `--quick` takes fewer rounds and writes bench-out/results-quick.json
// only, leaving the README alone.
import { spawn, spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import { loadavg, totalmem } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import sharp from 'sharp';
import { parse } from 'yaml';
import { rigFromDocument, pixelMapFromRig, prepareBilinear, remap } from '@skyfold/warp-core';
import { showFrame } from './show-frame.mjs';
import { RESULTS_SCHEMA, writeReadmeTable } from '../scripts/bench-table.mjs';

const ROOT = fileURLToPath(new URL('..', import.meta.url));
const PYTHON = '/usr/bin/python3';
const SOURCE = 4096;
const FRAME_SEED = 1;
const quick = process.argv.includes('--quick');
const roundsArg = process.argv.indexOf('--rounds');
const ROUNDS = roundsArg > 0 ? Number(process.argv[roundsArg + 1]) : quick ? 2 : 5;
if (!(Number.isInteger(ROUNDS) && ROUNDS >= 1)) throw new Error('bench: --rounds takes a whole number ≥ 1');
/** Timed runs per process: the whole-frame cases take a second each, the kernels a fraction. */
const repsOf = (name) => (quick ? 2 : name.startsWith('frame-') ? 3 : 5);

function machine() {
  let cpu = 'unknown';
  try {
    cpu = /^model name\s*:\s*(.*)$/m.exec(readFileSync('/proc/cpuinfo', 'utf8'))?.[1]?.trim() ?? cpu;
  } catch {}
  const n = spawnSync('nproc', { encoding: 'utf8' });
  return { cpu, nproc: Number(n.stdout?.trim()) || null, node: process.version, memoryGiB: Math.round(totalmem() / 2 ** 30) };
}

/** The bench's inputs in WORK: the frame (PNG and raw), the demo rig's map, reference outputs. */
async function prepare(work) {
  mkdirSync(work, { recursive: true });
  const stamp = join(work, 'frame.stamp');
  const want = `show-frame ${SOURCE} seed ${FRAME_SEED} v1`;
  let src;
  if (existsSync(stamp) && readFileSync(stamp, 'utf8') === want && existsSync(join(work, 'src.u8'))) {
    const b = readFileSync(join(work, 'src.u8'));
    src = { width: SOURCE, height: SOURCE, channels: 3, data: new Uint8Array(b.buffer, b.byteOffset, b.byteLength) };
  } else {
    src = showFrame(SOURCE, FRAME_SEED);
    writeFileSync(join(work, 'src.u8'), src.data);
    await sharp(src.data, { raw: { width: SOURCE, height: SOURCE, channels: 3 } }).png({ compressionLevel: 6 }).toFile(join(work, 'frame.png'));
    writeFileSync(stamp, want);
  }
  const rig = rigFromDocument(parse(readFileSync(join(ROOT, 'fixtures/demo-rig.yaml'), 'utf8')));
  const map = pixelMapFromRig(rig, [SOURCE, SOURCE]);
  const mask = new Float32Array(map.gain.length);
  let lit = 0;
  for (let k = 0; k < mask.length; k++) if (map.gain[k] > 0) (mask[k] = 1), lit++;
  const bytes = (a) => new Uint8Array(a.buffer, a.byteOffset, a.byteLength);
  writeFileSync(join(work, 'map-x.f32'), bytes(map.x));
  writeFileSync(join(work, 'map-y.f32'), bytes(map.y));
  writeFileSync(join(work, 'map-gain.f32'), bytes(map.gain));
  writeFileSync(join(work, 'map-mask.f32'), bytes(mask));
  const litFraction = lit / mask.length;
  writeFileSync(join(work, 'map.json'), JSON.stringify({ width: map.width, height: map.height, source: SOURCE, litFraction }));
  const masked = { ...map, gain: mask };
  // what skyfold warp --filter bilinear gives, for the comparison with OpenCV's fixed-point remap
  writeFileSync(join(work, 'ours-bilinear.u8'), remap(src, masked, { filter: 'bilinear', prepared: prepareBilinear(masked, SOURCE, SOURCE, 3) }).data);
  writeFileSync(join(work, 'warped-area.u8'), remap(src, map, { filter: 'area' }).data);
  return { map: { width: map.width, height: map.height, source: SOURCE, litFraction }, pngMiB: statSync(join(work, 'frame.png')).size / 2 ** 20 };
}

/** Runs one case in its own process; resolves to its parsed JSON line. */
function measure(name, work) {
  const [cmd, args] = name.startsWith('opencv-')
    ? [PYTHON, [join(ROOT, 'bench/opencv-remap.py'), name.slice(7), work, String(repsOf(name))]]
    : [process.execPath, [join(ROOT, 'bench/measure.mjs'), name, work, String(repsOf(name))]];
  // the machine's 1, 5 and 15 minute load averages (os.loadavg) just before and just after the process
  const before = loadavg();
  const withLoad = (res) => ({ ...res, load: { before, after: loadavg() } });
  return new Promise((resolve0) => {
    const resolve = (res) => resolve0(withLoad(res));
    let out = '';
    let err = '';
    let child;
    try {
      child = spawn(cmd, args, { stdio: ['ignore', 'pipe', 'pipe'] });
    } catch (e) {
      resolve({ case: name, skipped: `${cmd} failed: ${e.message}` });
      return;
    }
    child.stdout.on('data', (d) => (out += d));
    child.stderr.on('data', (d) => (err += d));
    child.on('error', (e) => resolve({ case: name, skipped: `${cmd} failed: ${e.message}` }));
    child.on('close', (code) => {
      const line = out.trim().split('\n').pop();
      if (code === 0 && line) resolve(JSON.parse(line));
      else resolve({ case: name, failed: `exit ${code}: ${err.trim().split('\n').pop() ?? ''}` });
    });
  });
}

const median = (a) => {
  const s = [...a].sort((p, q) => p - q);
  return s.length % 2 ? s[s.length >> 1] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2;
};
const summary = (values) => ({ median: median(values), min: Math.min(...values), max: Math.max(...values), values });

const CASES = ['trace', 'trace-3v', 'trace-32v', 'trace-3v-skirt', 'map', 'bilinear', 'bilinear-float', 'bilinear-gain', 'area', 'area-unplanned', 'opencv-float', 'opencv-fixed', 'frame-io', 'frame-bilinear', 'frame-area', 'encode-1', 'encode-6'];

const started = performance.now();
const m = machine();
console.log(`skyfold bench on ${m.cpu}, nproc ${m.nproc}, Node ${m.node}${quick ? ' (quick)' : ''}`);
const work = join(ROOT, 'bench-out/work');
const inputs = await prepare(work);
console.log(`inputs: demo rig map ${inputs.map.width}x${inputs.map.height} onto ${SOURCE}², ${(inputs.map.litFraction * 100).toFixed(0)}% lit; show-like frame PNG ${inputs.pngMiB.toFixed(1)} MiB`);

const perRound = Object.fromEntries(CASES.map((c) => [c, []]));
const skipped = {};
const extra = {};
/** Per case, one { before, after } load average record (1, 5, 15 min) per measurement, in round order. */
const loadOf = Object.fromEntries(CASES.map((c) => [c, []]));
for (let r = 0; r < ROUNDS; r++) {
  const order = CASES.map((_, i) => CASES[(i + r) % CASES.length]);
  for (const name of order) {
    const res = await measure(name, work);
    loadOf[name].push(res.load);
    if (res.skipped || res.failed) {
      skipped[name] = res.skipped ?? res.failed;
      if (res.failed) console.error(`bench: ${name} failed: ${res.failed}`);
      continue;
    }
    perRound[name].push(res);
    if (res.version) extra.opencv = res.version;
    if (res.agreement) extra.agreement = res.agreement;
  }
  console.log(`round ${r + 1}/${ROUNDS} done`);
}

const ms = (name) => perRound[name].map((res) => median(res.times));
const have = (...names) => names.every((n) => perRound[n].length === ROUNDS);
const ratio = (a, b) => ms(a).map((v, i) => v / ms(b)[i]);
const rows = [];
/** The 1-minute load averages before and after the measurements a row's figures come from. */
const loadFor = (cases) => {
  const l = cases.flatMap((c) => loadOf[c].flatMap((x) => [x.before[0], x.after[0]]));
  return { median: median(l), min: Math.min(...l), max: Math.max(...l) };
};
const row = (id, what, unit, values, aim, cases = [id]) => rows.push({ id, what, unit, ...summary(values), ...(aim ? { aim } : {}), cases, load1m: loadFor(cases) });
const { width: W, height: H } = inputs.map;
if (have('trace')) row('trace', `whole-frame trace, ${W} × ${H}, one core`, 'Mrays/s', ms('trace').map((t) => (W * H) / t / 1000), '≥ 10');
// on a dome mesh, as a share of the sphere's rays per second (sphere time / mesh time, within each round)
if (have('trace', 'trace-3v')) row('trace-3v', 'trace on a `dome.mesh`: 3V 5/8 geodesic, 105 triangles, / the sphere', '×', ratio('trace', 'trace-3v'), '≥ 0.5', ['trace', 'trace-3v']);
if (have('trace', 'trace-32v')) row('trace-32v', 'trace on a `dome.mesh`: 32V hemisphere on a skirt, 10,560 triangles, / the sphere', '×', ratio('trace', 'trace-32v'), '≥ 0.33', ['trace', 'trace-32v']);
if (have('trace', 'trace-3v-skirt')) row('trace-3v-skirt', 'trace on a `dome.mesh` that is not convex (3V 5/8 on a skirt, 135 triangles) / the sphere', '×', ratio('trace', 'trace-3v-skirt'), undefined, ['trace', 'trace-3v-skirt']);
if (have('map')) {
  row('map-time', `per-pixel map from the rig onto ${SOURCE}² (trace, mask, brightness), one core`, 'ms', ms('map'), '', ['map']);
  row('map-memory', 'peak memory of the process building that map', 'MiB', perRound.map.map((r) => r.maxRssMiB), '≤ 250', ['map']);
}
if (have('bilinear')) row('bilinear', `bilinear remap (fixed point, map prepared once), ${SOURCE}² RGB8 → ${W} × ${H}, mask-only map, one thread`, 'ms', ms('bilinear'));
if (have('bilinear', 'bilinear-float')) row('fixed-vs-float', 'bilinear in fixed point / the float kernel', '×', ratio('bilinear', 'bilinear-float'), undefined, ['bilinear', 'bilinear-float']);
if (have('bilinear', 'opencv-float')) row('vs-opencv-float', 'bilinear / OpenCV cv2.remap INTER_LINEAR, float maps', '×', ratio('bilinear', 'opencv-float'), '', ['bilinear', 'opencv-float']);
if (have('bilinear', 'opencv-fixed')) row('vs-opencv-fixed', 'bilinear / OpenCV cv2.remap INTER_LINEAR, fixed-point maps (cv2.convertMaps)', '×', ratio('bilinear', 'opencv-fixed'), '≤ 1.5', ['bilinear', 'opencv-fixed']);
if (have('opencv-fixed')) row('opencv-fixed', 'OpenCV cv2.remap, fixed-point maps, one thread', 'ms', ms('opencv-fixed'));
if (have('bilinear-gain', 'bilinear')) row('gain-cost', 'bilinear with the rig\'s brightness gain (linear light) / mask only', '×', ratio('bilinear-gain', 'bilinear'), undefined, ['bilinear-gain', 'bilinear']);
if (have('area', 'bilinear-gain')) row('area-vs-bilinear', '`area` remap (default; footprints planned once per map) / bilinear, both with gain', '×', ratio('area', 'bilinear-gain'), '≤ 2.5', ['area', 'bilinear-gain']);
if (have('area', 'area-unplanned')) row('area-plan', '`area` with footprints planned once / worked out every frame', '×', ratio('area', 'area-unplanned'), undefined, ['area', 'area-unplanned']);
if (have('frame-io')) row('frame-io', `decode the ${SOURCE}² PNG + encode the ${W} × ${H} PNG (level 6), no warp`, 'ms', ms('frame-io'));
if (have('frame-bilinear', 'frame-io')) row('frame-bilinear', 'whole frame with `bilinear` / decode + encode alone', '×', ratio('frame-bilinear', 'frame-io'), '≤ 1.2', ['frame-bilinear', 'frame-io']);
if (have('frame-area', 'frame-io')) row('frame-area', 'whole frame with `area` / decode + encode alone', '×', ratio('frame-area', 'frame-io'), '', ['frame-area', 'frame-io']);
if (have('encode-1', 'encode-6')) {
  row('encode-speed', `PNG encode of the ${W} × ${H} frame: zlib level 6 (default) time / level 1 time`, '×', ratio('encode-6', 'encode-1'), undefined, ['encode-6', 'encode-1']);
  row('encode-size', 'PNG size: level 1 / level 6', '×', perRound['encode-1'].map((r, i) => r.bytes / perRound['encode-6'][i].bytes), undefined, ['encode-1', 'encode-6']);
}

const results = {
  schema: RESULTS_SCHEMA,
  date: new Date().toISOString(),
  quick,
  machine: { ...m, ...(extra.opencv ? { opencv: extra.opencv } : {}) },
  method: { rounds: ROUNDS, repsPerProcess: repsOf('bilinear'), repsPerFrameProcess: repsOf('frame-io'), processPerMeasurement: true, interleaved: true, loadAverage: 'os.loadavg() (1, 5, 15 min) just before and just after each measurement', minutes: Number(((performance.now() - started) / 60000).toFixed(1)) },
  inputs: { rig: 'fixtures/demo-rig.yaml', ...inputs.map, frame: `bench/show-frame.mjs seed ${FRAME_SEED}`, framePngMiB: Number(inputs.pngMiB.toFixed(1)) },
  rows,
  // every measurement's load averages, per case in round order: [{ before: [1m, 5m, 15m], after }]
  load: loadOf,
  skipped,
  ...(extra.agreement ? { agreement: extra.agreement } : {}),
};
for (const r of rows) {
  const f = (v) => (r.unit === '×' ? v.toFixed(2) : v.toFixed(r.unit === 'ms' || r.unit === 'MiB' ? 0 : 1));
  console.log(`${r.id.padEnd(18)} ${f(r.median).padStart(7)} ${r.unit.padEnd(8)} (${f(r.min)}–${f(r.max)})${r.aim ? `  aim ${r.aim}` : ''}`);
}
for (const [k, why] of Object.entries(skipped)) console.log(`${k}: skipped (${why})`);
const file = join(ROOT, quick ? 'bench-out/results-quick.json' : 'bench-out/results.json');
writeFileSync(file, JSON.stringify(results, null, 2) + '\n');
console.log(`\nwrote ${file.slice(ROOT.length)}`);
if (!quick) {
  writeReadmeTable(join(ROOT, 'README.md'), results);
  console.log('rewrote the performance table in README.md');
}
