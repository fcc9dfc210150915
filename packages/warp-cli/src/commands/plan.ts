/** `skyfold plan`: searches mirror and projector placements and writes the best as a rig file. */
import { basename, dirname, extname, join } from 'node:path';
import { Option, type Command } from 'commander';
import { formatLength, parseLengthString, sweepPlacement, sweepPoint, type MoveStep, toMetres, type LengthUnit, type RoomModel, PLAN_DEFAULTS, PLAN_OBJECTIVES, planRig, RigError, rigToDocument, type PlanCandidate, type PlanObjective, type PlanResult, type Rig } from '@skyfold/warp-core';
import { readRig } from '../io/document-file.js';
import { editedRigText, rigDocumentText } from '../io/rig-edit.js';
import { writeFileAtomic, writeOutputFile } from '../io/output-file.js';
import { drawPlacementSweep } from '../pictures/placement-sweep.js';
import { svgToPng } from '../pictures/render.js';
import { UserError } from '../errors.js';
import { lengthText, printJson, table } from '../format.js';
import { collect, parseNumberIn, parsePositiveInt } from '../options.js';
import { VERSION } from '../version.js';
import { setExitCode, writeOut } from '../io/run-context.js';
import { wordNotice, wordRigError } from '../messages.js';
import { WorkProgress } from '../io/work-progress.js';

interface PlanCliOptions {
  vary?: string[];
  objective: PlanObjective;
  seed: number;
  evaluations: number;
  rays: number;
  mirrorPlace?: string;
  lensHeight?: string;
  audience?: string;
  leastLit?: number;
  sweep?: string;
  output?: string;
  json?: boolean;
}

/** Lengths "A,B,…" as the rig file writes them: a bare number in the rig's units, or with its own unit ("80 cm"). */
function lengthList(text: string, count: number, option: string, what: string, units: LengthUnit): number[] {
  const parts = text.split(',').map((p) => p.trim());
  if (parts.length !== count || parts.some((p) => p === '')) throw new UserError(`${option}: expected ${what}, got ${JSON.stringify(text.slice(0, 60))}`);
  return parts.map((p) => {
    const n = Number(p);
    if (Number.isFinite(n)) return toMetres(n, units);
    try {
      return parseLengthString(p);
    } catch {
      throw new UserError(`${option}: expected ${what} (numbers in the rig's units, or lengths such as "80 cm"), got ${JSON.stringify(p.slice(0, 60))}`);
    }
  });
}

/** The room options, over the rig's `room` section. */
export function roomOptions(opts: PlanCliOptions, units: LengthUnit): RoomModel {
  const room: RoomModel = {};
  const place = opts.mirrorPlace?.trim();
  if (place !== undefined) {
    const ends = /^(along|within)\s+(\S+)\s+(\S+)$/.exec(place);
    if (place === 'fixed' || place === 'edge') room.mirror = { kind: place };
    else if (ends) {
      const a = lengthList(ends[2], 3, '--mirror-place', 'a point X,Y,Z', units) as [number, number, number];
      const b = lengthList(ends[3], 3, '--mirror-place', 'a point X,Y,Z', units) as [number, number, number];
      if (ends[1] === 'along') {
        if (Math.hypot(a[0] - b[0], a[1] - b[1], a[2] - b[2]) < 1e-6) throw new UserError('--mirror-place: the two ends of "along" must differ');
        room.mirror = { kind: 'along', from: a, to: b };
      } else {
        room.mirror = { kind: 'within', min: [0, 1, 2].map((i) => Math.min(a[i], b[i])) as [number, number, number], max: [0, 1, 2].map((i) => Math.max(a[i], b[i])) as [number, number, number] };
      }
    } else throw new UserError(`--mirror-place: expected fixed, edge, "along X,Y,Z X,Y,Z" or "within X,Y,Z X,Y,Z", got ${JSON.stringify(place.slice(0, 60))}`);
  }
  if (opts.lensHeight !== undefined) {
    const [lo, hi] = lengthList(opts.lensHeight, 2, '--lens-height', 'LOW,HIGH above the floor', units);
    if (!(lo >= 0) || hi < lo) throw new UserError(`--lens-height: expected LOW,HIGH above the floor, lowest first, got ${JSON.stringify(opts.lensHeight.slice(0, 60))}`);
    room.lensHeight = [lo, hi];
  }
  if (opts.audience !== undefined) {
    if (opts.audience.trim() === 'none') room.audience = null;
    else {
      const [x, y, r] = lengthList(opts.audience, 3, '--audience', 'X,Y,RADIUS (a circle on the floor) or none', units);
      if (!(r > 0)) throw new UserError(`--audience: expected a positive radius, got ${JSON.stringify(opts.audience.slice(0, 60))}`);
      room.audience = { center: [x, y], radius: r, eyes: ['floor-seated', 'seated', 'standing'] };
    }
  }
  if (opts.leastLit !== undefined) room.leastLit = opts.leastLit;
  return room;
}

/** A short length for a move: centimetres in a metric rig, inches in one in feet, else the rig's unit. */
function moveLength(metres: number, units: LengthUnit): string {
  if (units === 'm' || units === 'cm') return `${Number((metres * 100).toFixed(metres < 0.1 ? 1 : 0))} cm`;
  if (units === 'ft' || units === 'in') return `${Number((metres / 0.0254).toFixed(1))} in`;
  return formatLength(metres, units, 0);
}

/** The moves in the room's words: "projector 14 cm toward the mirror and 5 cm lower; aim 2° up". */
export function wordMoves(moves: readonly MoveStep[], units: LengthUnit): string {
  if (!moves.length) return 'no move';
  const parts: string[] = [];
  for (const part of ['projector', 'aim', 'mirror', 'mirror tilt'] as const) {
    const steps = moves.filter((m) => m.part === part).map((m) => `${m.metres !== undefined ? moveLength(m.metres, units) : `${Math.round(m.degrees!)}°`} ${m.direction}`);
    if (!steps.length) continue;
    const joined = steps.length === 1 ? steps[0] : `${steps.slice(0, -1).join(', ')} and ${steps[steps.length - 1]}`;
    parts.push(`${part} ${joined}`);
  }
  return parts.join('; ');
}

function defaultOutput(rigPath: string): string {
  const ext = extname(rigPath);
  return join(dirname(rigPath), `${basename(rigPath, ext)}.planned.yaml`);
}

function candidateJson(c: PlanCandidate): Record<string, unknown> {
  return { figures: c.figures, values: c.values, bestFor: c.bestFor, moves: c.moves, rig: rigToDocument(c.rig) };
}

export function planSummary(p: PlanResult, units: Parameters<typeof formatLength>[1]): string {
  const pct = (x: number | null) => (x === null ? '-' : `${(x * 100).toFixed(1)}%`);
  const n = (x: number | null, d = 2) => (x === null ? '-' : x.toFixed(d));
  const names = Object.keys(p.current.values);
  const rows = [
    { label: 'current', c: p.current },
    ...p.best.map((c, i) => ({ label: `#${i + 1}`, c })),
  ].map(({ label, c }) => [
    label,
    pct(c.figures.coverage),
    pct(c.figures.sharpness),
    pct(c.figures.uniformity),
    pct(c.figures.efficiency),
    n(c.figures.median),
    pct(c.figures.pixelsLit),
    c.figures.focusNear === null ? '-' : `${lengthText(c.figures.focusNear, units, 2)}-${lengthText(c.figures.focusFar!, units, 2)}`,
    n(c.figures.score, 3),
    c.bestFor.join(', ') || '',
  ]);
  return table(['', 'coverage', 'sharpness', 'uniformity', 'efficiency', 'arcmin/px', 'pixels lit', 'focus depth', 'score', 'best for'], rows);
}

/**
 * The best placement as a rig file: the user's own document (`rigText`, which `before` was read from)
 * with only the varied values changed, in the form they were written, its comments kept.
 */
export function plannedRigText(result: PlanResult, before: Rig, rigText: string, rigPath: string): string {
  const best = result.best[0];
  const header = [
    ` Placement found by skyfold ${VERSION} plan (objective ${result.objective}, seed ${result.seed}, ${result.evaluations} evaluations)`,
    ` from ${rigPath}; varied: ${Object.keys(best.values).join(', ')}.`,
    ' Check it with `skyfold report` before moving anything; measure the real placement and refine with `skyfold fit`.',
  ];
  return editedRigText(rigText, before, best.rig, (doc) => {
    doc.commentBefore = [...header, ...(doc.commentBefore ? ['', doc.commentBefore] : [])].join('\n');
  });
}

export function registerPlan(program: Command): void {
  program
    .command('plan')
    .description('search mirror and projector placements within the dome for the best coverage, sharpness or both')
    .argument('<rig>', 'rig file (YAML or JSON), or a .glb baked by skyfold')
    .option('--vary <field>', `a field to search, repeatable: ${['mirror.center', 'mirror.axis', 'projector.position', 'projector.lookAt'].join(', ')}, or one coordinate such as mirror.center.z (default: ${PLAN_DEFAULTS.vary.join(' and ')})`, collect((s) => s))
    .addOption(new Option('--objective <name>', 'the weighting of coverage, sharpness, uniformity and efficiency to rank by (README "Planning")').choices(PLAN_OBJECTIVES as string[]).default(PLAN_DEFAULTS.objective))
    .option('--seed <n>', 'seed of the search; the same seed gives the same answer', (s) => parsePositiveInt(s, 'a positive whole number'), PLAN_DEFAULTS.seed)
    .option('--evaluations <n>', 'candidate placements to try (more is slower and surer)', (s) => parsePositiveInt(s), PLAN_DEFAULTS.evaluations)
    .option('--mirror-place <place>', "where the mirror may go: fixed, edge, \"along X,Y,Z X,Y,Z\" (a segment) or \"within X,Y,Z X,Y,Z\" (a box); in the rig's units (default: the rig's room.mirror, else edge)")
    .option('--lens-height <low,high>', "lens height above the floor, lowest and highest (a table, a stand; default: room.lensHeight, else 40 cm to 1.6 m)")
    .option('--audience <x,y,radius>', "the audience's circle on the floor: no projector there, the beam clear of eye heights over it; or none (default: room.audience)")
    .option('--least-lit <share>', "least share of the projector's pixels on the content (default: room.leastLit, else 0.25)", parseNumberIn(0, 0.99))
    .option('--rays <n>', 'about how many projector-frame points to trace when the table\'s rigs are measured, as `report --rays` does', (s) => parsePositiveInt(s), PLAN_DEFAULTS.reportVertices)
    .option('--sweep <png>', 'also draw the placement sweep (coverage, resolution and lit share against the projector\'s distance from the mirror and height), current and best marked, as a PNG')
    .option('-o, --output <file>', 'where to write the best rig (default: RIG.planned.yaml beside the rig)')
    .option('--json', 'machine-readable output')
    .addHelpText(
      'after',
      '\nExamples:\n  skyfold plan rig.yaml\n  skyfold plan rig.yaml --vary projector.position --objective coverage\n  skyfold plan rig.yaml --vary mirror.center.z --vary projector.lookAt --seed 7 --evaluations 3000 -o better.yaml',
    )
    .action(async (rigPath: string, opts: PlanCliOptions) => {
      const rig = readRig(rigPath);
      if (opts.evaluations < 20) throw new UserError(`--evaluations: expected at least 20, got ${opts.evaluations}`);
      if (opts.rays < 1000 || opts.rays > 2_000_000) throw new UserError(`--rays: expected a number from 1000 to 2000000, got ${opts.rays}`);
      let result: PlanResult;
      const progress = new WorkProgress('plan', !opts.json);
      try {
        const onProgress = (done: number, total: number) => progress.update(done, total);
        result = planRig(rig, { vary: opts.vary ?? [...PLAN_DEFAULTS.vary], objective: opts.objective, seed: opts.seed, evaluations: opts.evaluations, reportVertices: opts.rays, room: roomOptions(opts, rig.units), onProgress });
      } catch (e) {
        if (e instanceof RigError) throw new UserError(wordRigError(e));
        throw e;
      } finally {
        progress.finish();
      }
      const out = opts.output ?? defaultOutput(rigPath);
      // a candidate is written only when it beats the current rig (or the current rig breaks the room)
      const beats = (c: PlanCandidate) => !result.current.feasible || (c.figures.score ?? 0) > (result.current.figures.score ?? 0);
      const best = result.best[0] && beats(result.best[0]) ? result.best[0] : undefined;
      let wrote: string | null = null;
      if (best) {
        writeOutputFile(out, plannedRigText(result, rig, rigDocumentText(rigPath, rig), rigPath));
        wrote = out;
      }
      let sweepFile: string | null = null;
      if (opts.sweep) {
        const sweep = sweepPlacement(rig, { objective: result.objective, vary: result.vary }, result.room);
        const mark = best ? { point: sweepPoint(best.rig, result.room), label: 'candidate #1 (its distance and height; it may also move sideways or move the mirror)' } : null;
        try {
          writeFileAtomic(opts.sweep, await svgToPng(drawPlacementSweep(sweep, rig.units, { best: mark }).svg));
        } catch (e) {
          throw new UserError(`${opts.sweep}: cannot write the sweep picture: ${(e as Error).message}`);
        }
        sweepFile = opts.sweep;
      }
      if (opts.json) {
        printJson({
          objective: result.objective,
          seed: result.seed,
          evaluations: result.evaluations,
          vary: result.vary,
          bounds: result.bounds,
          current: { ...candidateJson(result.current), feasible: result.current.feasible, violations: result.current.violations },
          best: result.best.map((c) => ({ ...candidateJson(c), movesText: wordMoves(c.moves, rig.units) })),
          notes: result.notes.map((n) => wordNotice(n, rig.units)),
          file: wrote,
          sweep: sweepFile,
        });
        if (!result.best.length) setExitCode(1);
        return;
      }
      const lines = [planSummary(result, rig.units), '', ...result.best.map((c, i) => `#${i + 1}: ${wordMoves(c.moves, rig.units)}`), ''];
      if (!result.current.feasible) lines.push(`note: the current rig breaks a bound: ${result.current.violations.join('; ')}`);
      for (const n of result.notes) lines.push(`note: ${wordNotice(n, rig.units)}`);
      if (sweepFile) lines.push(`wrote ${sweepFile} (the placement sweep)`);
      lines.push(wrote ? `wrote ${wrote} (candidate #1)` : result.best.length ? 'the current rig scores best by the objective; nothing written' : 'no placement found; nothing written');
      writeOut(lines.join('\n') + '\n');
      if (!result.best.length) setExitCode(1);
    });
}
