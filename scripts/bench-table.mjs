#!/usr/bin/env node
// The README's performance table is written from bench-out/results.json, never by hand:
//
//   node scripts/bench-table.mjs          (rewrites the table between the markers in README.md)
//   node scripts/bench-table.mjs --check  (exits 1 if README.md's table is not the file's)
//
// `npm run bench` calls this itself; tests/bench-table.test.ts checks the file's structure and that
// the README shows exactly what it holds.
import { readFileSync, writeFileSync } from 'node:fs';
import { fileURLToPath, pathToFileURL } from 'node:url';

export const RESULTS_SCHEMA = 1;
export const TABLE_START = '<!-- bench-table: written by scripts/bench-table.mjs from bench-out/results.json -->';
export const TABLE_END = '<!-- /bench-table -->';
const UNITS = ['ms', '×', 'MiB', 'Mrays/s'];

/** Throws an Error naming the first field of `r` that is not what bench/run.mjs writes. */
export function checkResults(r) {
  const fail = (what) => {
    throw new Error(`bench results: ${what}`);
  };
  if (!r || typeof r !== 'object') fail('not an object');
  if (r.schema !== RESULTS_SCHEMA) fail(`expected schema ${RESULTS_SCHEMA} but found ${r.schema}`);
  if (typeof r.date !== 'string' || Number.isNaN(Date.parse(r.date))) fail('date is not an ISO date');
  const m = r.machine ?? fail('no machine');
  if (typeof m.cpu !== 'string' || !m.cpu) fail('machine.cpu missing');
  if (!Number.isInteger(m.nproc) || m.nproc < 1) fail('machine.nproc missing');
  if (!/^v\d+\.\d+\.\d+/.test(m.node ?? '')) fail('machine.node is not a Node version');
  const me = r.method ?? fail('no method');
  if (!(me.rounds >= 1) || !(me.repsPerProcess >= 1) || me.processPerMeasurement !== true || me.interleaved !== true) fail('method is not one process per measurement, interleaved');
  const inp = r.inputs ?? fail('no inputs');
  if (!(inp.litFraction > 0 && inp.litFraction <= 1) || !inp.rig || !inp.frame) fail('inputs do not name the rig, the frame and the lit fraction');
  if (!Array.isArray(r.rows) || r.rows.length === 0) fail('no rows');
  const ids = new Set();
  for (const [i, row] of r.rows.entries()) {
    const at = `rows[${i}]`;
    if (typeof row.id !== 'string' || ids.has(row.id)) fail(`${at}.id missing or repeated`);
    ids.add(row.id);
    if (typeof row.what !== 'string' || !row.what) fail(`${at}.what missing`);
    if (!UNITS.includes(row.unit)) fail(`${at}.unit is ${row.unit}, not one of ${UNITS.join(', ')}`);
    if (!Array.isArray(row.values) || row.values.length !== me.rounds || !row.values.every(Number.isFinite)) fail(`${at}.values is not one finite figure per round`);
    const s = [...row.values].sort((a, b) => a - b);
    const mid = s.length % 2 ? s[s.length >> 1] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2;
    if (row.min !== s[0] || row.max !== s[s.length - 1] || Math.abs(row.median - mid) > 1e-9 * Math.abs(mid)) fail(`${at} median/min/max do not summarise its values`);
  }
  if (typeof r.skipped !== 'object' || r.skipped === null) fail('skipped missing');
  if (me.loadAverage !== undefined) {
    // the load averages around every measurement (os.loadavg), and per row those of its measurements
    if (typeof r.load !== 'object' || r.load === null) fail('load missing though method.loadAverage is set');
    const triple = (t) => Array.isArray(t) && t.length === 3 && t.every((v) => Number.isFinite(v) && v >= 0);
    for (const [name, list] of Object.entries(r.load)) {
      if (!Array.isArray(list) || !list.every((x) => x && triple(x.before) && triple(x.after))) fail(`load.${name} is not a list of { before, after } load averages`);
    }
    for (const [i, row] of r.rows.entries()) {
      const l = row.load1m;
      if (!l || ![l.median, l.min, l.max].every(Number.isFinite) || !(l.min <= l.median && l.median <= l.max)) fail(`rows[${i}].load1m missing`);
      if (!Array.isArray(row.cases) || !row.cases.every((c) => Array.isArray(r.load[c]))) fail(`rows[${i}].cases do not name measured cases`);
    }
  }
  return r;
}

function fmt(v, unit) {
  if (unit === '×') return `${v.toFixed(2)}×`;
  if (unit === 'Mrays/s') return `${v.toFixed(1)} M rays/s`;
  return `${v.toFixed(0)} ${unit}`;
}

/** The markdown the README shows for results `r` (checked first). */
export function renderTable(r) {
  checkResults(r);
  const m = r.machine;
  const lines = [
    TABLE_START,
    '',
    `Machine: ${m.cpu}, \`nproc\` ${m.nproc}, ${m.memoryGiB ?? '?'} GiB, Node ${m.node}${m.opencv ? `, OpenCV ${m.opencv}` : ''}; ${r.date.slice(0, 10)}.`,
    `Method: ${r.method.rounds} interleaved rounds, each measurement in a process of its own (median of ${r.method.repsPerProcess} runs after a warm-up${r.method.repsPerFrameProcess ? `, ${r.method.repsPerFrameProcess} for whole frames` : ''}; the map is built cold, once); ` +
      `median over rounds, range min–max. Inputs: the map of \`${r.inputs.rig}\` (${r.inputs.width} × ${r.inputs.height}, ` +
      `${(r.inputs.litFraction * 100).toFixed(0)}% of pixels lit) onto a ${r.inputs.source}² show-like frame (${r.inputs.frame}, PNG ${r.inputs.framePngMiB} MiB).`,
    '',
    ...(r.method.loadAverage
      ? [`Load: the 1-minute load average (\`os.loadavg\`) just before and just after each measurement; per row the median (min–max) over the measurements behind it. The bench took ${r.method.minutes} min.`, '']
      : []),
    '| what | median | range | aim | load (1 min) |',
    '|---|---|---|---|---|',
    ...r.rows.map(
      (row) =>
        `| ${row.what} | ${fmt(row.median, row.unit)} | ${fmt(row.min, row.unit)} – ${fmt(row.max, row.unit)} | ${row.aim ? `${row.aim}${row.unit === '×' ? '×' : ` ${row.unit}`}` : '—'} | ${row.load1m ? `${row.load1m.median.toFixed(2)} (${row.load1m.min.toFixed(2)}–${row.load1m.max.toFixed(2)})` : '—'} |`,
    ),
  ];
  const skipped = Object.entries(r.skipped);
  if (skipped.length) lines.push('', ...skipped.map(([k, why]) => `Not measured: ${k} (${why}).`));
  if (r.agreement) {
    const a = r.agreement;
    lines.push('', `skyfold's bilinear output against OpenCV's fixed-point remap on ${a.pixels} interior pixels: mean |difference| ${a.meanAbs.toFixed(3)} code values, max ${a.maxAbs}, ${(a.fractionOver1 * 100).toFixed(2)}% differ by more than 1.`);
  }
  lines.push('', TABLE_END);
  return lines.join('\n');
}

/** `readme` with the text between the markers replaced by renderTable(r). Throws if the markers are missing. */
export function replaceTable(readme, r) {
  const a = readme.indexOf(TABLE_START);
  const b = readme.indexOf(TABLE_END);
  if (a < 0 || b < a) throw new Error('README.md has no bench-table markers');
  return readme.slice(0, a) + renderTable(r) + readme.slice(b + TABLE_END.length);
}

/** The table as it stands in `readme` (markers included), or undefined. */
export function tableIn(readme) {
  const a = readme.indexOf(TABLE_START);
  const b = readme.indexOf(TABLE_END);
  return a < 0 || b < a ? undefined : readme.slice(a, b + TABLE_END.length);
}

export function writeReadmeTable(readmePath, r) {
  writeFileSync(readmePath, replaceTable(readFileSync(readmePath, 'utf8'), r));
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  const root = fileURLToPath(new URL('..', import.meta.url));
  const results = JSON.parse(readFileSync(root + 'bench-out/results.json', 'utf8'));
  const readme = root + 'README.md';
  if (process.argv.includes('--check')) {
    const ok = tableIn(readFileSync(readme, 'utf8')) === renderTable(results);
    if (!ok) console.error('README.md: the performance table is not bench-out/results.json; run node scripts/bench-table.mjs');
    process.exitCode = ok ? 0 : 1;
  } else {
    writeReadmeTable(readme, results);
    console.log('rewrote the performance table in README.md');
  }
}
