/** `skyfold plan`: searches mirror and projector placements and writes the best as a rig file. */
import { basename, dirname, extname, join } from 'node:path';
import { Option, type Command } from 'commander';
import { parseDocument } from 'yaml';
import { formatLength, PLAN_DEFAULTS, PLAN_OBJECTIVES, planRig, RigError, rigToDocument, type PlanCandidate, type PlanObjective, type PlanResult, type Rig } from '@skyfold/warp-core';
import { readRig } from '../io/document-file.js';
import { editRigDocument, keepCommentColumns, rigDocumentText } from '../io/rig-edit.js';
import { writeOutputFile } from '../io/output-file.js';
import { UserError } from '../errors.js';
import { printJson, table } from '../format.js';
import { collect, parsePositiveInt } from '../options.js';
import { VERSION } from '../version.js';
import { setExitCode, writeOut } from '../io/run-context.js';
import { wordNotice, wordRigError } from '../messages.js';

interface PlanCliOptions {
  vary?: string[];
  objective: PlanObjective;
  seed: number;
  evaluations: number;
  rays: number;
  output?: string;
  json?: boolean;
}

function defaultOutput(rigPath: string): string {
  const ext = extname(rigPath);
  return join(dirname(rigPath), `${basename(rigPath, ext)}.planned.yaml`);
}

function candidateJson(c: PlanCandidate): Record<string, unknown> {
  return { figures: c.figures, values: c.values, rig: rigToDocument(c.rig) };
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
    n(c.figures.median),
    n(c.figures.p95),
    pct(c.figures.pixelsLit),
    c.figures.focusNear === null ? '-' : `${formatLength(c.figures.focusNear, units, 2)}-${formatLength(c.figures.focusFar!, units, 2)}`,
    n(c.figures.score, 3),
    names.map((k) => (k.includes('axis') ? `${n(c.values[k], 1)}°` : formatLength(c.values[k], units, 3))).join(', '),
  ]);
  return table(['', 'coverage', 'arcmin/px', 'p95', 'pixels lit', 'focus depth', 'score', names.join(', ')], rows);
}

/**
 * The best placement as a rig file: the user's own document (`rigText`, which `before` was read from)
 * with only the varied values changed, in the form they were written, its comments kept.
 */
export function plannedRigText(result: PlanResult, before: Rig, rigText: string, rigPath: string): string {
  const best = result.best[0];
  const doc = parseDocument(rigText);
  editRigDocument(doc, before, best.rig);
  const header = [
    ` Placement found by skyfold ${VERSION} plan (objective ${result.objective}, seed ${result.seed}, ${result.evaluations} evaluations)`,
    ` from ${rigPath}; varied: ${Object.keys(best.values).join(', ')}.`,
    ' Check it with `skyfold report` before moving anything; measure the real placement and refine with `skyfold fit`.',
  ];
  doc.commentBefore = [...header, ...(doc.commentBefore ? ['', doc.commentBefore] : [])].join('\n');
  return keepCommentColumns(rigText, doc.toString({ lineWidth: 0, flowCollectionPadding: false }));
}

export function registerPlan(program: Command): void {
  program
    .command('plan')
    .description('search mirror and projector placements within the dome for the best coverage, sharpness or both')
    .argument('<rig>', 'rig file (YAML or JSON), or a .glb baked by skyfold')
    .option('--vary <field>', `a field to search, repeatable: ${['mirror.center', 'mirror.axis', 'projector.position', 'projector.lookAt'].join(', ')}, or one coordinate such as mirror.center.z (default: ${PLAN_DEFAULTS.vary.join(' and ')})`, collect((s) => s))
    .addOption(new Option('--objective <name>', 'what to optimize').choices(PLAN_OBJECTIVES as string[]).default(PLAN_DEFAULTS.objective))
    .option('--seed <n>', 'seed of the search; the same seed gives the same answer', (s) => parsePositiveInt(s, 'a positive whole number'), PLAN_DEFAULTS.seed)
    .option('--evaluations <n>', 'candidate placements to try (more is slower and surer)', (s) => parsePositiveInt(s), PLAN_DEFAULTS.evaluations)
    .option('--rays <n>', 'about how many projector-frame points to trace when the table\'s rigs are measured, as `report --rays` does', (s) => parsePositiveInt(s), PLAN_DEFAULTS.reportVertices)
    .option('-o, --output <file>', 'where to write the best rig (default: RIG.planned.yaml beside the rig)')
    .option('--json', 'machine-readable output')
    .addHelpText(
      'after',
      '\nExamples:\n  skyfold plan rig.yaml\n  skyfold plan rig.yaml --vary projector.position --objective coverage\n  skyfold plan rig.yaml --vary mirror.center.z --vary projector.lookAt --seed 7 --evaluations 3000 -o better.yaml',
    )
    .action((rigPath: string, opts: PlanCliOptions) => {
      const rig = readRig(rigPath);
      if (opts.evaluations < 20) throw new UserError(`--evaluations: expected at least 20, got ${opts.evaluations}`);
      if (opts.rays < 1000 || opts.rays > 2_000_000) throw new UserError(`--rays: expected a number from 1000 to 2000000, got ${opts.rays}`);
      let result: PlanResult;
      try {
        result = planRig(rig, { vary: opts.vary ?? [...PLAN_DEFAULTS.vary], objective: opts.objective, seed: opts.seed, evaluations: opts.evaluations, reportVertices: opts.rays });
      } catch (e) {
        if (e instanceof RigError) throw new UserError(wordRigError(e));
        throw e;
      }
      const out = opts.output ?? defaultOutput(rigPath);
      const best = result.best[0];
      let wrote: string | null = null;
      if (best) {
        writeOutputFile(out, plannedRigText(result, rig, rigDocumentText(rigPath, rig), rigPath));
        wrote = out;
      }
      if (opts.json) {
        printJson({
          objective: result.objective,
          seed: result.seed,
          evaluations: result.evaluations,
          vary: result.vary,
          bounds: result.bounds,
          current: { ...candidateJson(result.current), feasible: result.current.feasible, violations: result.current.violations },
          best: result.best.map(candidateJson),
          notes: result.notes.map((n) => wordNotice(n, rig.units)),
          file: wrote,
        });
        if (!best) setExitCode(1);
        return;
      }
      const lines = [planSummary(result, rig.units), ''];
      if (!result.current.feasible) lines.push(`note: the current rig breaks a bound: ${result.current.violations.join('; ')}`);
      for (const n of result.notes) lines.push(`note: ${wordNotice(n, rig.units)}`);
      lines.push(wrote ? `wrote ${wrote} (candidate #1)` : 'no placement found; nothing written');
      writeOut(lines.join('\n') + '\n');
      if (!best) setExitCode(1);
    });
}
