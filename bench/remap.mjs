// Benchmark of the remap kernels against OpenCV's cv2.remap on the same data.
//
//   node bench/remap.mjs [--quick]      (after `npx tsc -b`)
//
// A 4096² RGB 8-bit procedural dome master is warped into a 1920×1200 projector frame through a
// smooth radial map (corners fall outside the source). skyfold's nearest, bilinear and area
// filters are timed (median of several runs, one thread); then /usr/bin/python3 times
// cv2.remap(INTER_LINEAR, float32 maps, cv2.setNumThreads(1)) on exactly the same source and map,
// and compares its output with ours as an outside check of our bilinear kernel.
import { spawn } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { createInterface } from 'node:readline';
import { pathToFileURL } from 'node:url';
import { remap, createImageLike } from '@skyfold/warp-core';

const SRC = 4096;
const OUT_W = 1920;
const OUT_H = 1200;
const PYTHON = '/usr/bin/python3';

/** Procedural RGB8 source: fine texture in red, smooth gradients in green, rings in blue. */
function makeSource(n) {
  const data = new Uint8Array(n * n * 3);
  const c = n / 2;
  for (let y = 0, o = 0; y < n; y++) {
    const dy = y - c;
    for (let x = 0; x < n; x++, o += 3) {
      const dx = x - c;
      data[o] = (x ^ y) & 255;
      data[o + 1] = ((x + 2 * y) >> 4) & 255;
      data[o + 2] = 128 + 127 * Math.cos(Math.sqrt(dx * dx + dy * dy) * 0.05);
    }
  }
  return { width: n, height: n, channels: 3, data };
}

/**
 * A fisheye squeezed into a projector frame: polar coordinates about the frame centre, the radius
 * bent by a power law and the angle turned, the way a mirror warp bends a dome master. Gain is 1
 * where the point lands in the source and 0 elsewhere (the mask), or a smooth brightness ramp.
 */
function makeMap(w, h, n, brightness) {
  const size = w * h;
  const x = new Float32Array(size);
  const y = new Float32Array(size);
  const gain = new Float32Array(size);
  const cx = w / 2;
  const cy = h / 2;
  for (let j = 0, k = 0; j < h; j++) {
    for (let i = 0; i < w; i++, k++) {
      const dx = (i + 0.5 - cx) / cx;
      const dy = (j + 0.5 - cy) / cx;
      const r = Math.hypot(dx, dy);
      const rho = Math.pow(r, 0.8) * 0.51 * n;
      const th = Math.atan2(dy, dx) + 0.3;
      x[k] = n / 2 + rho * Math.cos(th);
      y[k] = n / 2 + rho * Math.sin(th);
      const inside = x[k] >= 0 && x[k] < n && y[k] >= 0 && y[k] < n;
      gain[k] = inside ? (brightness ? 0.6 + 0.4 * (1 - Math.min(1, r)) : 1) : 0;
    }
  }
  return { width: w, height: h, x, y, gain };
}

function median(a) {
  const s = [...a].sort((p, q) => p - q);
  return s[s.length >> 1];
}

function time(fn, runs) {
  fn(); // warm-up: tables, JIT
  const t = [];
  for (let r = 0; r < runs; r++) {
    const t0 = performance.now();
    fn();
    t.push(performance.now() - t0);
  }
  return median(t);
}

// The OpenCV side stays alive and times one call per request, so that its runs interleave with ours
// and a busy machine slows both alike. numpy backs large arrays with transparent huge pages
// (madvise) while Node's ArrayBuffers get ordinary 4 KiB pages, so OpenCV is timed both ways.
const PY = String.raw`
import sys, json, time
try:
    import cv2, numpy as np
except Exception as e:
    print(json.dumps({"error": "cv2 unavailable: " + str(e)}), flush=True); sys.exit(0)
d, n, w, h = sys.argv[1], int(sys.argv[2]), int(sys.argv[3]), int(sys.argv[4])
cv2.setNumThreads(1)
src = np.fromfile(d + "/src.u8", np.uint8).reshape(n, n, 3)
mx = np.fromfile(d + "/mapx.f32", np.float32).reshape(h, w)
my = np.fromfile(d + "/mapy.f32", np.float32).reshape(h, w)
ours = np.fromfile(d + "/ours.u8", np.uint8).reshape(h, w, 3).astype(np.int16)
inner = np.fromfile(d + "/inner.u8", np.uint8).reshape(h, w) > 0
def run(a):
    cv2.remap(a[0], a[1], a[2], cv2.INTER_LINEAR, dst=a[3], borderMode=cv2.BORDER_CONSTANT, borderValue=0)
out = cv2.remap(src, mx, my, cv2.INTER_LINEAR, borderMode=cv2.BORDER_CONSTANT, borderValue=0)
sets = {"huge": (src, mx, my, out)}
try:
    np.core.multiarray._set_madvise_hugepage(False)
    sets["4k"] = (src.copy(), mx.copy(), my.copy(), out.copy())
except Exception:
    pass
for a in sets.values(): run(a)
diff = np.abs(out.astype(np.int16) - ours)
print(json.dumps({"version": cv2.__version__, "sets": list(sets),
    "meanAbs": float(diff.mean()), "meanAbsInner": float(diff[inner].mean()),
    "maxAbsInner": int(diff[inner].max()), "over2Inner": float((diff[inner] > 2).mean())}), flush=True)
for line in sys.stdin:
    key = line.strip()
    if key not in sets: break
    t0 = time.perf_counter()
    run(sets[key])
    print(json.dumps({"ms": (time.perf_counter() - t0) * 1000}), flush=True)
`;

/** Starts the OpenCV side; resolves to { info, ask(key) → ms, close() } or { error }. */
async function startOpenCv(dir) {
  let child;
  try {
    child = spawn(PYTHON, ['-c', PY, dir, String(SRC), String(OUT_W), String(OUT_H)], {
      stdio: ['pipe', 'pipe', 'pipe'],
    });
  } catch (e) {
    return { error: `${PYTHON} failed: ${e.message}` };
  }
  let stderr = '';
  child.stderr.on('data', (d) => (stderr += d));
  const waiting = [];
  const lines = createInterface({ input: child.stdout });
  lines.on('line', (line) => waiting.shift()?.resolve(JSON.parse(line)));
  const ended = new Promise((resolve) => {
    child.on('error', (e) => resolve({ error: `${PYTHON} failed: ${e.message}` }));
    child.on('close', () => resolve({ error: `${PYTHON} exited: ${stderr.trim().split('\n').pop() ?? ''}` }));
  });
  const next = () => Promise.race([new Promise((resolve) => waiting.push({ resolve })), ended]);
  const info = await next();
  if (info.error) return info;
  return {
    info,
    ask: async (key) => {
      child.stdin.write(`${key}\n`);
      const r = await next();
      if (r.error) throw new Error(r.error);
      return r.ms;
    },
    close: () => {
      child.stdin.end('quit\n');
      return ended;
    },
  };
}

/** Runs the benchmark; returns { rows }, one row per measurement. `quick` takes fewer runs. */
export async function benchRemap({ quick = false } = {}) {
  const runs = quick ? 3 : 7;
  const src = makeSource(SRC);
  const map = makeMap(OUT_W, OUT_H, SRC, false);
  const out = createImageLike(src, OUT_W, OUT_H);
  const rows = [];
  const label = `${SRC}² RGB8 → ${OUT_W}×${OUT_H}`;
  rows.push({ name: 'remap nearest', case: label, ms: time(() => remap(src, map, { filter: 'nearest', out }), runs) });
  const lit = makeMap(OUT_W, OUT_H, SRC, true);
  rows.push({
    name: 'remap bilinear + linear-light gain',
    case: label,
    ms: time(() => remap(src, lit, { filter: 'bilinear', out }), runs),
  });

  // The same data for OpenCV: its pixel centres are at integers, ours at +0.5.
  const ours = remap(src, map, { filter: 'bilinear' });
  const dir = mkdtempSync(join(tmpdir(), 'skyfold-bench-'));
  try {
    const cx = new Float32Array(map.x.length);
    const cy = new Float32Array(map.y.length);
    // Pixels whose four bilinear neighbours all lie inside the source, where the two
    // implementations must agree (at the border OpenCV blends with its constant border, we clamp).
    const inner = new Uint8Array(map.x.length);
    for (let k = 0; k < cx.length; k++) {
      cx[k] = map.x[k] - 0.5;
      cy[k] = map.y[k] - 0.5;
      inner[k] = cx[k] >= 0 && cx[k] < SRC - 1 && cy[k] >= 0 && cy[k] < SRC - 1 ? 1 : 0;
    }
    writeFileSync(join(dir, 'src.u8'), src.data);
    writeFileSync(join(dir, 'mapx.f32'), new Uint8Array(cx.buffer));
    writeFileSync(join(dir, 'mapy.f32'), new Uint8Array(cy.buffer));
    writeFileSync(join(dir, 'ours.u8'), ours.data);
    writeFileSync(join(dir, 'inner.u8'), inner);
    const cv = await startOpenCv(dir);
    const sets = cv.error ? [] : cv.info.sets;
    // Interleaved: one skyfold bilinear run, one OpenCV run per memory setting, one skyfold area run
    // (its pyramid built inside, as every call without a prepared one does), `runs` times over.
    const ourTimes = [];
    const areaTimes = [];
    const cvTimes = Object.fromEntries(sets.map((k) => [k, []]));
    remap(src, map, { filter: 'bilinear', out }); // warm-up
    remap(src, map, { filter: 'area', out });
    for (let r = 0; r < runs; r++) {
      let t0 = performance.now();
      remap(src, map, { filter: 'bilinear', out });
      ourTimes.push(performance.now() - t0);
      for (const key of sets) cvTimes[key].push(await cv.ask(key));
      t0 = performance.now();
      remap(src, map, { filter: 'area', out });
      areaTimes.push(performance.now() - t0);
    }
    const ourMs = median(ourTimes);
    rows.splice(1, 0, { name: 'remap bilinear', case: label, ms: ourMs });
    rows.splice(2, 0, { name: 'remap area (default)', case: label, ms: median(areaTimes), areaRatio: median(areaTimes) / ourMs });
    if (cv.error) {
      rows.push({ name: 'opencv remap INTER_LINEAR', case: label, skipped: cv.error });
    } else {
      await cv.close();
      const names = { '4k': '4 KiB pages like Node', huge: 'numpy default, huge pages' };
      for (const key of sets) {
        const ms = median(cvTimes[key]);
        rows.push({
          name: `opencv ${cv.info.version} INTER_LINEAR, 1 thread, ${names[key]}`,
          case: label,
          ms,
          ratio: ourMs / ms,
        });
      }
      rows[rows.length - 1].agreement = {
        meanAbs: cv.info.meanAbs,
        meanAbsInner: cv.info.meanAbsInner,
        maxAbsInner: cv.info.maxAbsInner,
        fractionOver2Inner: cv.info.over2Inner,
      };
    }
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
  return { rows };
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  const { rows } = await benchRemap({ quick: process.argv.includes('--quick') });
  for (const r of rows) {
    if (r.skipped) {
      console.log(`${r.name.padEnd(56)} skipped: ${r.skipped}`);
      continue;
    }
    let line = `${r.name.padEnd(56)} ${r.ms.toFixed(1).padStart(7)} ms  (${r.case})`;
    if (r.areaRatio !== undefined) line += `\n${''.padEnd(56)} area / bilinear = ${r.areaRatio.toFixed(2)}×`;
    if (r.ratio !== undefined) {
      line += `\n${''.padEnd(56)} skyfold bilinear / OpenCV = ${r.ratio.toFixed(2)}×`;
      const a = r.agreement;
      if (a) line +=
        `\n${''.padEnd(56)} |skyfold − OpenCV|: mean ${a.meanAbs.toFixed(3)} (all), ` +
        `${a.meanAbsInner.toFixed(3)} (interior), max ${a.maxAbsInner}, >2 codes ${(a.fractionOver2Inner * 100).toFixed(2)} %`;
    }
    console.log(line);
  }
}
