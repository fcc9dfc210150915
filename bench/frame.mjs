// A whole frame, side by side in one run: decode a 4096² PNG dome master, warp it to the demo
// projector (1920x1200), encode PNG — against decode + encode alone (the same decode, and an encode
// of the same warped image). The ratio is what warping adds to the I/O a batch must do anyway.
import { readFileSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import sharp from 'sharp';
import { parse } from 'yaml';
import { rigFromDocument, pixelMapFromRig, remap, createImageLike, starField } from '@skyfold/warp-core';

async function decode(path) {
  const { data, info } = await sharp(path).raw().toBuffer({ resolveWithObject: true });
  return { width: info.width, height: info.height, channels: info.channels, data: new Uint8Array(data.buffer, data.byteOffset, data.byteLength) };
}

async function encode(img) {
  return sharp(img.data, { raw: { width: img.width, height: img.height, channels: img.channels } }).png({ compressionLevel: 6 }).toBuffer();
}

export async function benchFrame({ quick = false } = {}) {
  const dir = mkdtempSync(join(tmpdir(), 'skyfold-bench-'));
  try {
    const N = 4096;
    const src = starField(N, { seed: 3 });
    const path = join(dir, 'frame.png');
    await sharp(src.data, { raw: { width: N, height: N, channels: 3 } }).png().toFile(path);
    const rig = rigFromDocument(parse(readFileSync(new URL('../fixtures/demo-rig.yaml', import.meta.url), 'utf8')));
    const map = pixelMapFromRig(rig, [N, N]);
    const runs = quick ? 3 : 5;
    const rows = [];
    for (const filter of ['bilinear', 'area']) {
      const ioTimes = [];
      const fullTimes = [];
      const remapTimes = [];
      let out;
      const warped = remap(await decode(path), map, { filter });
      for (let i = 0; i < runs + 1; i++) {
        // alternate the two so drift in machine load hits both alike
        let t0 = performance.now();
        await decode(path);
        await encode(warped); // the very image the full run encodes, so the encoder does the same work
        const io = performance.now() - t0;
        t0 = performance.now();
        const b = await decode(path);
        out ??= createImageLike(b, map.width, map.height);
        const r0 = performance.now();
        remap(b, map, { filter, out });
        const r1 = performance.now();
        await encode(out);
        const full = performance.now() - t0;
        if (i > 0) {
          ioTimes.push(io);
          fullTimes.push(full);
          remapTimes.push(r1 - r0);
        }
      }
      const med = (a) => a.sort((x, y) => x - y)[Math.floor(a.length / 2)];
      rows.push({ filter, ioMs: med(ioTimes), fullMs: med(fullTimes), remapMs: med(remapTimes), ratio: med(fullTimes) / med(ioTimes) });
    }
    return rows;
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

if (import.meta.url === `file://${process.argv[1]}`) {
  for (const r of await benchFrame()) {
    console.log(`frame (${r.filter}): decode+warp+encode ${r.fullMs.toFixed(0)} ms vs decode+encode ${r.ioMs.toFixed(0)} ms = ${r.ratio.toFixed(2)}x (warp alone ${r.remapMs.toFixed(0)} ms)`);
  }
}
