// The README's performance table is the bench's own output: bench-out/results.json has the structure
// bench/run.mjs writes, and README.md shows exactly the table scripts/bench-table.mjs renders from it.
// Structure only: no figure is compared with any expected speed.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
// @ts-ignore -- a plain .mjs script without typings
import { checkResults, renderTable, replaceTable, tableIn, TABLE_START, TABLE_END } from '../scripts/bench-table.mjs';

const root = new URL('..', import.meta.url);
const results = JSON.parse(readFileSync(new URL('bench-out/results.json', root), 'utf8'));
const readme = readFileSync(new URL('README.md', root), 'utf8');

function sample() {
  return {
    schema: 1,
    date: '2026-12-02T16:00:00.000Z',
    quick: false,
    machine: { cpu: 'Test CPU', nproc: 2, node: 'v20.20.2', memoryGiB: 8 },
    method: { rounds: 3, repsPerProcess: 5, processPerMeasurement: true, interleaved: true },
    inputs: { rig: 'fixtures/demo-rig.yaml', width: 1920, height: 1200, source: 4096, litFraction: 0.44, frame: 'bench/show-frame.mjs seed 1', framePngMiB: 40 },
    rows: [{ id: 'ratio', what: 'a over b', unit: '×', median: 2.5, min: 2.25, max: 3.125, values: [3.125, 2.25, 2.5], aim: '≤ 1.5' }],
    skipped: { 'opencv-fixed': 'cv2 unavailable: test' },
  };
}

describe('bench-out/results.json', () => {
  it('has the structure bench/run.mjs writes, naming the machine', () => {
    expect(() => checkResults(results)).not.toThrow();
    expect(results.machine.cpu.length).toBeGreaterThan(0);
    expect(results.machine.nproc).toBeGreaterThanOrEqual(1);
    expect(results.quick).toBe(false);
  });

  it('is what the README shows, between the markers', () => {
    expect(tableIn(readme)).toBe(renderTable(results));
  });

  it('measures the kernel against OpenCV or says why not', () => {
    const ids = results.rows.map((r: { id: string }) => r.id);
    for (const id of ['vs-opencv-float', 'vs-opencv-fixed']) {
      if (!ids.includes(id)) expect(Object.keys(results.skipped).some((k) => k.startsWith('opencv-'))).toBe(true);
    }
    expect(ids).toContain('bilinear');
    expect(ids).toContain('frame-bilinear');
  });

  it('shows the trace on the dome meshes beside the sphere', () => {
    const ids = results.rows.map((r: { id: string }) => r.id);
    for (const id of ['trace', 'trace-3v', 'trace-32v', 'trace-3v-skirt']) expect(ids).toContain(id);
    for (const id of ['trace-3v', 'trace-32v', 'trace-3v-skirt']) expect(tableIn(readme)).toContain(results.rows.find((r: { id: string }) => r.id === id).what);
  });

  it('records the load average around every measurement, and the table shows it per row', () => {
    expect(results.method.loadAverage).toBeTruthy();
    for (const list of Object.values(results.load) as { before: number[]; after: number[] }[][]) expect(list.length).toBe(results.method.rounds);
    expect(tableIn(readme)).toContain('| load (1 min) |');
    for (const row of results.rows) expect(row.load1m.max).toBeGreaterThanOrEqual(row.load1m.min);
  });
});

describe('checkResults', () => {
  it('accepts a well-formed file', () => {
    expect(checkResults(sample())).toBeTruthy();
  });

  it('rejects a file that does not name the machine', () => {
    const r = sample();
    r.machine.cpu = '';
    expect(() => checkResults(r)).toThrow('bench results: machine.cpu missing');
  });

  it('rejects a median that does not summarise its values', () => {
    const r = sample();
    r.rows[0].median = 2.6;
    expect(() => checkResults(r)).toThrow('bench results: rows[0] median/min/max do not summarise its values');
  });

  it('rejects a row with fewer figures than rounds', () => {
    const r = sample();
    r.rows[0].values = [2.5, 2.25];
    expect(() => checkResults(r)).toThrow('bench results: rows[0].values is not one finite figure per round');
  });

  it('rejects figures not taken one process per measurement', () => {
    const r = sample();
    r.method.processPerMeasurement = false;
    expect(() => checkResults(r)).toThrow('bench results: method is not one process per measurement, interleaved');
  });
});

describe('load averages', () => {
  const withLoad = () => {
    const r: any = sample();
    r.method.loadAverage = 'os.loadavg() before and after each measurement';
    r.method.minutes = 3.5;
    r.load = { a: [0, 1, 2].map((i) => ({ before: [0.5 + i, 1, 1], after: [0.75 + i, 1, 1] })) };
    r.rows[0].cases = ['a'];
    r.rows[0].load1m = { median: 1.625, min: 0.5, max: 2.75 };
    return r;
  };

  it('are shown per row with the time the bench took', () => {
    const t = renderTable(withLoad());
    expect(t).toContain('| a over b | 2.50× | 2.25× – 3.13× | ≤ 1.5× | 1.63 (0.50–2.75) |');
    expect(t).toContain('The bench took 3.5 min.');
  });

  it('must be there for every row once the method says they were taken', () => {
    const r = withLoad();
    delete r.rows[0].load1m;
    expect(() => checkResults(r)).toThrow('bench results: rows[0].load1m missing');
    const q = withLoad();
    q.load.a[1].after = [1];
    expect(() => checkResults(q)).toThrow('bench results: load.a is not a list of { before, after } load averages');
  });
});

describe('renderTable', () => {
  it('writes each row with its median, range and aim, the machine and what was skipped', () => {
    const t = renderTable(sample());
    expect(t.startsWith(TABLE_START)).toBe(true);
    expect(t.endsWith(TABLE_END)).toBe(true);
    expect(t).toContain('| a over b | 2.50× | 2.25× – 3.13× | ≤ 1.5× |');
    expect(t).toContain('Machine: Test CPU, `nproc` 2, 8 GiB, Node v20.20.2; 2026-12-02.');
    expect(t).toContain('Not measured: opencv-fixed (cv2 unavailable: test).');
  });

  it('replaces only the text between the markers', () => {
    const doc = `intro\n${TABLE_START}\nold\n${TABLE_END}\noutro\n`;
    const out = replaceTable(doc, sample());
    expect(out.startsWith('intro\n')).toBe(true);
    expect(out.endsWith('\noutro\n')).toBe(true);
    expect(out).not.toContain('\nold\n');
    expect(() => replaceTable('no markers', sample())).toThrow('README.md has no bench-table markers');
  });
});
