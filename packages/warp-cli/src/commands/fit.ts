/** `skyfold fit`: solves rig quantities from tape distances and observed marker positions. */
import { realpathSync } from 'node:fs';
import { resolve } from 'node:path';
import { InvalidArgumentError, type Command } from 'commander';
import { isMap, isScalar, parseDocument } from 'yaml';
import {
  fitRig,
  FIT_DEFAULTS,
  FREE_QUANTITIES,
  formatLength,
  fromMetres,
  measurementsFromDocument,
  parseFreeQuantity,
  RAD,
  RigError,
  wrapDegrees,
  type FitParameter,
  type FitResidual,
  type FitResult,
  type FreeQuantity,
  type LengthUnit,
  type MeasurementSet,
  type Rig,
} from '@skyfold/warp-core';
import { loadRig, readDocumentFile } from '../io/document-file.js';
import { editedRigText, rigDocumentText } from '../io/rig-edit.js';
import { refuseToOverwrite, writeOutputFile } from '../io/output-file.js';
import { UserError } from '../errors.js';
import { fixed, printJson, table } from '../format.js';
import { warn, wordNotice } from '../messages.js';
import { writeOut } from '../io/run-context.js';

interface FitCliOptions {
  output?: string;
  force?: boolean;
  robust?: boolean;
  free?: FreeQuantity[];
  trilaterate: boolean;
  json?: boolean;
}

function parseFreeList(text: string): FreeQuantity[] {
  const names = text.split(',').map((s) => s.trim()).filter((s) => s !== '');
  if (names.length === 0) throw new InvalidArgumentError(`expected a comma-separated list of ${FREE_QUANTITIES.join(', ')}, got "${text}"`);
  return names.map((n) => {
    try {
      return parseFreeQuantity(n, 'free');
    } catch (e) {
      if (e instanceof RigError) throw new InvalidArgumentError(e.reason);
      throw e;
    }
  });
}

/** Reads and checks a measurement file; every failure is a one-line UserError naming the file and field. */
export function loadMeasurements(path: string): MeasurementSet {
  return readDocumentFile(path, 'measurement file', measurementsFromDocument).value;
}

/** Digits worth showing for a residual in a unit (about 0.1 mm). */
function lengthDigits(units: LengthUnit): number {
  return units === 'm' ? 4 : units === 'cm' ? 2 : units === 'mm' ? 1 : 3;
}

function showQuantity(p: FitParameter, values: readonly (number | null)[], units: LengthUnit, stderr = false): string {
  const one = (x: number | null): string => {
    if (x === null) return 'undetermined';
    if (p.kind === 'length') return stderr ? formatLength(x, units === 'm' ? 'mm' : units, units === 'm' ? 1 : lengthDigits(units)) : formatLength(x, units, 4);
    if (p.kind === 'angle') return `${fixed(x * RAD, stderr ? 3 : 3)}°`;
    return stderr ? x.toPrecision(2) : fixed(x, 5);
  };
  const parts = values.map(one);
  return parts.length === 1 ? parts[0] : `[${parts.join(', ')}]`;
}

function residualRow(r: FitResidual, units: LengthUnit): string[] {
  const digits = lengthDigits(units);
  if (r.kind === 'distance') {
    return [r.field, r.label, formatLength(r.measured, units, digits), formatLength(r.model, units, digits), formatLength(r.residual, units, digits), fixed(r.normalized, 2), fixed(r.weight, 2)];
  }
  const dir = ([az, alt]: readonly number[]) => (alt * RAD > 89.95 ? 'zenith' : `az ${fixed(wrapDegrees(az * RAD), 1)}, alt ${fixed(alt * RAD, 1)}`);
  return [r.field, r.label, dir(r.observed), r.onMirror ? dir(r.model) : 'misses the mirror', `${fixed(r.angle * RAD, 3)}°`, fixed(r.normalized, 2), fixed(r.weight, 2)];
}

function residualJson(r: FitResidual, units: LengthUnit): Record<string, unknown> {
  if (r.kind === 'distance') {
    return {
      item: r.field,
      kind: r.kind,
      label: r.label,
      measured: fromMetres(r.measured, units),
      fitted: fromMetres(r.model, units),
      residual: fromMetres(r.residual, units),
      sigma: fromMetres(r.sigma, units),
      normalized: r.normalized,
      weight: r.weight,
    };
  }
  return {
    item: r.field,
    kind: r.kind,
    label: r.label,
    pixel: r.pixel,
    observed: { azimuth: wrapDegrees(r.observed[0] * RAD), altitude: r.observed[1] * RAD },
    fitted: { azimuth: wrapDegrees(r.model[0] * RAD), altitude: r.model[1] * RAD, onMirror: r.onMirror },
    residual: r.angle * RAD,
    sigma: r.sigma * RAD,
    normalized: r.normalized,
    weight: r.weight,
  };
}

/** A parameter's numbers in the rig file's terms: lengths in its units, angles in degrees. */
function inUnits(p: FitParameter, xs: readonly (number | null)[], units: LengthUnit): (number | null)[] {
  return xs.map((x) => (x === null ? null : p.kind === 'length' ? fromMetres(x, units) : p.kind === 'angle' ? x * RAD : x));
}

function summaryLine(s: FitResult['after'], units: LengthUnit): string {
  const parts = [`rms ${fixed(s.rms, 2)} sigma`];
  if (s.rmsDistance !== null) parts.push(`distances ${formatLength(s.rmsDistance, units, lengthDigits(units))} rms`);
  if (s.rmsAngle !== null) parts.push(`observations ${fixed(s.rmsAngle * RAD, 3)}° rms`);
  return parts.join(', ');
}

/**
 * The fitted rig as a rig file: the user's own document (`rigText`, which `before` was read from) with
 * only the fitted values changed, in the form they were written, its comments kept, and comments
 * added saying what was fitted and how well.
 */
export function fittedRigText(result: FitResult, before: Rig, rigText: string, rigPath: string, measurementsPath: string, units: LengthUnit): string {
  return editedRigText(rigText, before, result.rig, (doc, edit) => {
    const lines = [
      ` Fitted by \`skyfold fit\` from ${rigPath} and ${measurementsPath}.`,
      ` Solved: ${result.free.join(', ')}; everything else is as in ${rigPath}.`,
      ` ${result.equations} equations, ${result.unknowns} unknowns; ${result.converged ? 'converged' : 'did NOT converge'} after ${result.iterations} iterations.`,
      ` Misfit before: ${summaryLine(result.before, units)}.`,
      ` Misfit after:  ${summaryLine(result.after, units)}.`,
    ];
    if (result.worst) lines.push(` Worst item: ${result.worst.field} (${result.worst.label}), ${fixed(Math.abs(result.worst.normalized), 2)} sigma.`);
    for (const w of result.warnings) lines.push(` Warning: ${wordNotice(w, before.units)}.`);
    lines.push(' Standard errors (one sigma) are above each fitted value.');
    doc.commentBefore = [...lines, ...(doc.commentBefore ? ['', doc.commentBefore] : [])].join('\n');
    const ru = before.units;
    for (const p of result.parameters) {
      let note = ` fitted, ± ${showQuantity(p, p.stderr, ru, true)}`;
      if (p.name === 'projector.lookAt' && p.aimStderr) note += ` (aim ± ${p.aimStderr.map((s) => (s === null ? 'undetermined' : `${fixed(s * RAD, 3)}°`)).join(', ')})`;
      note += `; was ${showQuantity(p, p.initial, ru)}`;
      noteAbove(doc, edit.written.get(p.name) ?? p.name.split('.'), note);
    }
  });
}

/** A comment line above the key that holds `path` (for a component of a point, above the point's key). */
function noteAbove(doc: ReturnType<typeof parseDocument>, path: readonly (string | number)[], note: string): void {
  const keyPath = path.filter((k) => typeof k === 'string');
  const parent = doc.getIn(keyPath.slice(0, -1), true);
  if (!isMap(parent)) return;
  const pair = parent.items.find((it) => isScalar(it.key) && it.key.value === keyPath[keyPath.length - 1]);
  if (!pair || !isScalar(pair.key)) return;
  pair.key.commentBefore = pair.key.commentBefore ? `${pair.key.commentBefore}\n${note}` : note;
}

function sameFile(a: string, b: string): boolean {
  const real = (p: string) => {
    try {
      return realpathSync(p);
    } catch {
      return resolve(p);
    }
  };
  return real(a) === real(b);
}

export function registerFit(program: Command): void {
  program
    .command('fit')
    .description('solve rig quantities from tape distances and observed marker positions (least squares), with residuals and standard errors')
    .argument('<rig>', 'the rough rig file (YAML or JSON), or a .glb baked by skyfold')
    .argument('<measurements>', 'measurement file: measurements (distances), observations (pixel → dome point), free (what to solve)')
    .option('-o, --output <file>', 'write the fitted rig here (without it, only the report)')
    .option('--force', 'overwrite an existing output file (also needed to overwrite the input rig)')
    .option('--robust', 'Huber-weight the items so one bad reading cannot drag the fit')
    .option('--free <list>', `which quantities to solve, comma-separated, replacing the file's free list (${FREE_QUANTITIES.join(', ')})`, parseFreeList)
    .option('--no-trilaterate', 'do not start the mirror pole or lens from a trilateration of its distances')
    .option('--json', 'machine-readable output')
    .addHelpText(
      'after',
      '\nExamples:\n  skyfold fit rig.yaml measurements.yaml -o fitted.yaml\n  skyfold fit rig.yaml measurements.yaml --robust --free mirror.center,projector.lookAt,projector.roll --json',
    )
    .action((rigPath: string, measurementsPath: string, opts: FitCliOptions) => {
      const { rig, warnings: rigWarnings } = loadRig(rigPath);
      const set = loadMeasurements(measurementsPath);
      if (opts.output) refuseToOverwrite(opts.output, opts.force, sameFile(opts.output, rigPath) ? ' (it is the input rig)' : '');
      let result: FitResult;
      try {
        result = fitRig(rig, set, { robust: opts.robust ?? FIT_DEFAULTS.robust, free: opts.free, trilaterate: opts.trilaterate });
      } catch (e) {
        if (e instanceof RigError) throw new UserError(`${measurementsPath}: ${e.message}`);
        throw e;
      }
      const units = set.units;
      if (opts.output) writeOutputFile(opts.output, fittedRigText(result, rig, rigDocumentText(rigPath, rig), rigPath, measurementsPath, units));
      const ru = rig.units;
      if (opts.json) {
        const parameters: Record<string, unknown> = {};
        for (const p of result.parameters) {
          const unit = p.kind === 'length' ? ru : p.kind === 'angle' ? 'deg' : null;
          const entry: Record<string, unknown> = {
            value: inUnits(p, p.value, ru),
            stderr: inUnits(p, p.stderr, ru),
            initial: inUnits(p, p.initial, ru),
            unit,
          };
          if (p.value.length === 1) {
            entry.value = (entry.value as number[])[0];
            entry.stderr = (entry.stderr as number[])[0];
            entry.initial = (entry.initial as number[])[0];
          }
          if (p.aimStderr) entry.aimStderr = p.aimStderr.map((s) => (s === null ? null : s * RAD));
          parameters[p.name] = entry;
        }
        printJson({
          rms: result.after.rms,
          rmsBefore: result.before.rms,
          rmsDistance: result.after.rmsDistance === null ? null : fromMetres(result.after.rmsDistance, units),
          rmsAngle: result.after.rmsAngle === null ? null : result.after.rmsAngle * RAD,
          units,
          equations: result.equations,
          unknowns: result.unknowns,
          iterations: result.iterations,
          converged: result.converged,
          residuals: result.residuals.map((r) => residualJson(r, units)),
          parameters,
          worst: result.worst ? residualJson(result.worst, units) : null,
          degeneracies: result.degeneracies.map((d) => ({ quantities: d.quantities, components: d.components, severity: d.severity, inflation: Number.isFinite(d.inflation) ? d.inflation : null, where: d.where })),
          warnings: [...rigWarnings, ...result.warnings.map((w) => wordNotice(w, ru))],
          notes: result.notes.map((n) => wordNotice(n, ru)),
          output: opts.output ?? null,
        });
        return;
      }
      rigWarnings.forEach(warn);
      result.warnings.forEach((w) => warn(`${measurementsPath}: ${wordNotice(w, ru)}`));
      const out: string[] = [];
      out.push(
        `fit: ${set.measurements.length} distances and ${set.observations.length} observations = ${result.equations} equations for ${result.unknowns} unknowns (${result.free.join(', ')})`,
      );
      for (const n of result.notes) out.push(`note: ${wordNotice(n, ru)}`);
      out.push(`${result.converged ? 'converged' : 'stopped without converging'} after ${result.iterations} iterations`);
      out.push(`misfit before: ${summaryLine(result.before, units)}`);
      out.push(`misfit after:  ${summaryLine(result.after, units)}`);
      out.push('');
      out.push(table(['item', 'what', 'measured / seen', 'fitted', 'residual', 'sigmas', 'weight'], result.residuals.map((r) => residualRow(r, units))));
      out.push('');
      out.push(
        table(
          ['quantity', 'before', 'fitted', 'std. error'],
          result.parameters.map((p) => [
            p.name,
            showQuantity(p, p.initial, ru),
            showQuantity(p, p.value, ru),
            showQuantity(p, p.stderr, ru, true) + (p.aimStderr ? ` (aim ${p.aimStderr.map((s) => (s === null ? 'undetermined' : `${fixed(s * RAD, 3)}°`)).join(', ')})` : ''),
          ]),
        ),
      );
      if (result.worst) out.push(`\nworst: ${result.worst.field} (${result.worst.label}), ${fixed(Math.abs(result.worst.normalized), 2)} sigma`);
      if (opts.output) out.push(`wrote ${opts.output}`);
      writeOut(out.join('\n') + '\n');
    });
}
