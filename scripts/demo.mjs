#!/usr/bin/env node
// `npm run demo`: skyfold's main job on the bundled demo rig (fixtures/demo-rig.yaml) and frames it
// draws itself. Everything lands in demo-out/. Rerunning resumes: frames already warped are skipped.
import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync } from 'node:fs';
import { join, dirname } from 'node:path';
import { fileURLToPath } from 'node:url';
import sharp from 'sharp';
import { starField, gridCard } from '@skyfold/warp-core';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const bin = join(root, 'packages/warp-cli/bin/skyfold.js');
const rig = 'fixtures/demo-rig.yaml';
const out = join(root, 'demo-out');
const SIZE = 2048;

function skyfold(...args) {
  console.log(`\n$ skyfold ${args.join(' ')}`);
  const r = spawnSync(process.execPath, [bin, ...args], { stdio: 'inherit', cwd: root });
  if (r.status === 2 || r.status === null) {
    console.error(`demo: skyfold ${args[0]} failed (exit ${r.status})`);
    process.exit(1);
  }
  return r.status;
}

async function makeFrames(dir) {
  mkdirSync(dir, { recursive: true });
  const write = (img, name) => {
    const path = join(dir, name);
    if (existsSync(path)) return Promise.resolve();
    return sharp(img.data, { raw: { width: img.width, height: img.height, channels: img.channels } }).png().toFile(path);
  };
  const jobs = [];
  for (let f = 1; f <= 6; f++) jobs.push(write(starField(SIZE, { seed: 11, turnDeg: f * 1.5 }), `sky_${String(f).padStart(4, '0')}.png`));
  jobs.push(write(gridCard(SIZE), 'alignment_grid.png'));
  await Promise.all(jobs);
}

console.log('skyfold demo: the Larkspur Hill Astronomy Club 5 m portable dome (an invented scenario)');
console.log(`frames: a turning star field and an alignment grid, ${SIZE}x${SIZE} dome masters, drawn by skyfold itself`);
await makeFrames(join(out, 'show'));
skyfold('probe', rig, '--pixel', '960.5,600.5', '--pixel', '100,100');
skyfold('bake', rig, '-o', 'demo-out/mesh/demo.glb', '-o', 'demo-out/mesh/demo.mpcdi', '-o', 'demo-out/mesh/demo.obj', '-o', 'demo-out/mesh/demo.pfm', '-o', 'demo-out/mesh/demo.png', '-o', 'demo-out/mesh/demo.csv');
const warpStatus = skyfold('warp', rig, 'demo-out/show', '-o', 'demo-out/warped');
skyfold('simulate', rig, 'demo-out/warped/alignment_grid.png', '-o', 'demo-out/seen_alignment_grid.png', '--size', '768');
skyfold('report', rig, '-o', 'demo-out/report');

// a second rig, on an as-built dome: a school's 4V geodesic on a low wall, in feet and inches
const school = 'fixtures/school-dome-rig.yaml';
console.log('\nA second rig: Maple Hollow Elementary, an 18 ft 4V geodesic dome on a 2 ft wall (invented); its mesh fixtures/school-dome.obj');
skyfold('bake', school, '-o', 'demo-out/school/school.glb');
skyfold('warp', school, 'demo-out/show/alignment_grid.png', '-o', 'demo-out/school/warped');
skyfold('report', school, '-o', 'demo-out/school/report', '--rays', '30000');
console.log(`
Done. Look in demo-out/:
  show/       the dome-master frames
  mesh/       the warp mesh in six formats (demo.glb is skyfold's own; demo.mpcdi for MPCDI players)
  warped/     the pre-warped projector frames (1920x1200) to play through the mirror
  seen_alignment_grid.png   what the audience would see of the warped grid
  report/     coverage, resolution, brightness, focus and safety: open demo-out/report/report.html
  school/     the second rig (a geodesic dome as built): its .glb (with the dome's triangles), the
              warped alignment grid, and its report, which says how far a sphere would misplace content

Safety: never look into the beam (it crosses the dome at eye height); secure the mirror and its stand
so they cannot tip; keep aisles and exits clear in the dark; mind hot equipment and cables; local fire
and building codes and the projector maker's instructions come first.`);
process.exit(warpStatus === 0 ? 0 : 1);
