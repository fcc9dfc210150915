// A show as a video, side by side in one run: a 2048² H.264 dome master with sound warped by
// `skyfold warp` to the demo projector's 1920 × 1200 H.264 (the defaults: libx264, preset medium,
// CRF 18, yuv420p, sound copied) — against ffmpeg alone decoding and encoding the same video to
// the same size and settings (-vf scale=1920:1200). Skipped without ffmpeg. Run: node bench/video.mjs [--quick]
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';

const ROOT = fileURLToPath(new URL('..', import.meta.url));
const BIN = join(ROOT, 'node_modules', '.bin', 'skyfold');

function run(cmd, args) {
  const t0 = performance.now();
  const r = spawnSync(cmd, args, { encoding: 'utf8', env: { ...process.env, CI: 'true' } });
  if (r.status !== 0) throw new Error(`${cmd} ${args.join(' ')}: ${r.stderr}`);
  return performance.now() - t0;
}

export async function benchVideo({ quick = false } = {}) {
  if (spawnSync('ffmpeg', ['-version']).status !== 0) return { skipped: 'ffmpeg is not installed' };
  const dir = mkdtempSync(join(tmpdir(), 'skyfold-bench-video-'));
  try {
    const frames = quick ? 30 : 90;
    const show = join(dir, 'show.mp4');
    // a moving test picture with a tone: enough detail that the encoders do real work
    run('ffmpeg', ['-v', 'error', '-y', '-f', 'lavfi', '-i', 'testsrc2=size=2048x2048:rate=30', '-f', 'lavfi', '-i', 'sine=frequency=440:sample_rate=48000',
      '-frames:v', String(frames), '-shortest', '-c:v', 'libx264', '-preset', 'veryfast', '-crf', '20', '-pix_fmt', 'yuv420p', '-c:a', 'aac', show]);
    const rig = join(ROOT, 'fixtures', 'demo-rig.yaml');
    const runs = quick ? 1 : 3;
    const med = (a) => [...a].sort((x, y) => x - y)[Math.floor(a.length / 2)];
    const ffmpegAlone = [];
    const rows = {};
    for (const filter of ['bilinear', 'area']) rows[filter] = [];
    for (let i = 0; i < runs; i++) {
      // interleaved, so drift in machine load hits both alike
      ffmpegAlone.push(run('ffmpeg', ['-v', 'error', '-y', '-i', show, '-map', '0', '-vf', 'scale=1920:1200', '-c:v', 'libx264', '-preset', 'medium', '-crf', '18', '-pix_fmt', 'yuv420p', '-c:a', 'copy', join(dir, 'plain.mp4')]));
      for (const filter of ['bilinear', 'area']) rows[filter].push(run(BIN, ['warp', rig, show, '-o', join(dir, `warped-${filter}.mp4`), '--filter', filter, '--json']));
    }
    const alone = med(ffmpegAlone);
    return {
      frames,
      ffmpegMs: alone,
      ffmpegFps: (frames * 1000) / alone,
      rows: ['bilinear', 'area'].map((filter) => {
        const ms = med(rows[filter]);
        return { filter, ms, fps: (frames * 1000) / ms, ratio: ms / alone, hourShowHours: (108000 / ((frames * 1000) / ms)) / 3600 };
      }),
    };
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

if (import.meta.url === `file://${process.argv[1]}`) console.log(JSON.stringify(await benchVideo({ quick: process.argv.includes('--quick') }), null, 2));
