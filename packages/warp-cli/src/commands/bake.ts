/** `skyfold bake`: the warp mesh, with its measured accuracy, in open formats. */
import { Option, type Command } from 'commander';
import { ADAPTIVE_DEFAULTS, BAKE_DEFAULTS, bakeAdaptive, bakeMesh, type AdaptiveBake, type TriangleAccuracy, fillLayoutFromRig, pixelSamples, RigError, rigToDocument, type BakeOptions, type BakeResult, type LengthUnit, type Rig } from '@skyfold/warp-core';
import { readRig } from '../io/document-file.js';
import { writeOutputFile } from '../io/output-file.js';
import { UserError } from '../errors.js';
import { encodeMesh, formatFromPath, MESH_FORMATS, TRIANGLE_FORMATS, type MeshFormat } from '../export/index.js';
import { printJson } from '../format.js';
import { collect, parseNumberIn, parsePositiveInt, parseSize } from '../options.js';
import { VERSION } from '../version.js';
import { writeOut } from '../io/run-context.js';
import { wordNotice } from '../messages.js';

// the accuracy check traces 25 points per cell five times over: finer grids run out of memory
const parseGrid = parseSize({ min: 2, max: { value: BAKE_DEFAULTS.maxCols, why: 'the finest grid bake chooses itself' }, what: 'COLSxROWS with at least 2 each (e.g. 321x201)' });

/** The command's options: the core's bake settings plus where and how to write. */
export interface BakeCliOptions extends Pick<BakeOptions, 'tolerance' | 'masterSize' | 'brightness' | 'brightnessFloor' | 'feather'> {
  output: string[];
  format?: MeshFormat;
  grid?: [number, number];
  alphaResolution: AlphaResolution;
  adaptive?: boolean;
  smallestCell: number;
  json?: boolean;
}

/** What the MPCDI alpha map and the PNG map are sampled on: the vertex grid, or every projector pixel exactly. */
export type AlphaResolution = 'grid' | 'full';
export const ALPHA_RESOLUTIONS: readonly AlphaResolution[] = ['grid', 'full'];

/** The bake summary as printed by --json (stable keys). */
export function bakeSummary(r: BakeResult, files: string[], units: LengthUnit): Record<string, unknown> {
  const a = r.accuracy;
  return {
    grid: [r.mesh.cols, r.mesh.rows],
    litFraction: r.litFraction,
    errorP99Projector: a.errorP99Projector,
    errorMaxProjector: a.errorMaxProjector,
    errorP99Px: a.errorP99Px,
    errorMaxPx: a.errorMaxPx,
    brightnessMin: r.brightnessMin,
    brightnessMax: r.brightnessMax,
    files,
    tolerance: r.options.tolerance,
    masterSize: r.options.masterSize,
    cellsMeasured: a.cells,
    cellsOverTolerance: a.overTolerance,
    worstAt: a.worstAt,
    triangles: a.triangles,
    edge: r.edge,
    notes: r.notes.map((n) => wordNotice(n, units)),
  };
}

/** The adaptive mesh's figures beside the uniform grid's, as --json prints them. */
export function adaptiveSummary(a: AdaptiveBake, smallestCell: number): Record<string, unknown> {
  const figures = (t: TriangleAccuracy) => ({
    vertices: t.vertices,
    triangles: t.triangles,
    litPixels: t.pixels,
    withinTolerance: t.withinTolerance,
    errorP99Projector: t.errorP99Projector,
    errorP999Projector: t.errorP999Projector,
  });
  return { smallestCell, ...figures(a.accuracy), uniform: figures(a.uniform) };
}

/** One file to write: its path and format. */
export interface BakeTarget {
  path: string;
  format: MeshFormat;
}

/**
 * Bakes `rig` and writes each target, as `skyfold bake` does (the live page's bake runs this too);
 * `rigPath` names the rig in errors.
 */
export async function bakeToFiles(
  rig: Rig,
  rigPath: string,
  targets: readonly BakeTarget[],
  opts: Omit<BakeCliOptions, 'output' | 'format' | 'json'>,
): Promise<{ result: BakeResult; adaptive?: AdaptiveBake; pixels?: ReturnType<typeof pixelSamples> }> {
  const settings = {
    grid: opts.grid,
    tolerance: opts.tolerance,
    masterSize: opts.masterSize,
    brightness: opts.brightness,
    brightnessFloor: opts.brightnessFloor,
    feather: opts.feather,
  };
  const meta = { generator: `skyfold ${VERSION}`, rig: rigToDocument(rig, 'm'), bake: settings as Record<string, unknown> };
  let result: BakeResult;
  try {
    result = bakeMesh(rig, settings, meta);
  } catch (e) {
    if (e instanceof RigError) throw new UserError(`${rigPath}: nothing to bake: ${e.message}`);
    throw e;
  }
  meta.bake = { ...settings, grid: [result.mesh.cols, result.mesh.rows], accuracy: result.accuracy, edge: result.edge, areaMax: result.areaMax };
  let adaptive: AdaptiveBake | undefined;
  if (opts.adaptive) {
    adaptive = bakeAdaptive(rig, result, { smallestCell: opts.smallestCell }, { ...meta, bake: { ...meta.bake, adaptive: { smallestCell: opts.smallestCell } } });
    adaptive.mesh.meta = { ...adaptive.mesh.meta, bake: { ...(meta.bake as object), adaptive: adaptiveSummary(adaptive, opts.smallestCell) } };
  }
  const perPixel = opts.alphaResolution === 'full' && targets.some((t) => t.format === 'mpcdi' || t.format === 'png');
  const pixels = perPixel ? pixelSamples(rig, settings) : undefined;
  // MPCDI's warp grid is in the standard's fill layout, traced at its own sample positions
  const warp = targets.some((t) => t.format === 'mpcdi') ? fillLayoutFromRig(rig, result.mesh.cols, result.mesh.rows) : undefined;
  for (const t of targets) {
    writeOutputFile(t.path, await encodeMesh(result.mesh, t.format, { pixels, mpcdi: { warp }, dome: rig.dome.mesh, adaptive: TRIANGLE_FORMATS.includes(t.format) ? adaptive?.mesh : undefined }));
  }
  return { result, adaptive, pixels };
}

export function registerBake(program: Command): void {
  program
    .command('bake')
    .description('bake the warp mesh (fisheye u, v + brightness + mask per vertex) and write it in open formats')
    .argument('<rig>', 'rig file (YAML or JSON), or a .glb baked by skyfold')
    .requiredOption('-o, --output <file>', `output file, repeatable; format from the extension (${MESH_FORMATS.map((f) => '.' + f).join(' ')})`, collect((s) => s))
    .addOption(new Option('--format <format>', 'format for every -o file, overriding the extensions').choices(MESH_FORMATS))
    .option('--grid <colsxrows>', 'vertices across and down (default: chosen to meet --tolerance)', parseGrid)
    .option('--tolerance <px>', 'largest interpolation error over 99% of lit cells, in projector pixels', parseNumberIn(1e-3, 100), BAKE_DEFAULTS.tolerance)
    .option('--master-size <n>', 'dome-master size the errors in dome-master pixels refer to', (s) => parsePositiveInt(s), BAKE_DEFAULTS.masterSize)
    .option('--brightness <s>', 'brightness compensation strength, 0 (off) to 1 (full)', parseNumberIn(0, 1), BAKE_DEFAULTS.brightness)
    .option('--brightness-floor <f>', 'lowest brightness factor, so no region goes black', parseNumberIn(0, 1), BAKE_DEFAULTS.brightnessFloor)
    .option('--feather <deg>', "width on the dome in degrees of the mask's ramp across the edge of the lit area (0 = the narrowest the grid allows)", parseNumberIn(0, 90), BAKE_DEFAULTS.feather)
    .addOption(
      new Option('--alpha-resolution <which>', "the .mpcdi alpha map and the .png map: 'grid' (from the mesh's vertices) or 'full' (traced exactly at every projector pixel)")
        .choices(ALPHA_RESOLUTIONS)
        .default('grid'),
    )
    .option('--json', 'machine-readable summary')
    .option('--adaptive', 'write .glb and .obj as an adaptive mesh: cells split where the error exceeds --tolerance, down to --smallest-cell (the grid formats stay regular)')
    .option('--smallest-cell <px>', 'side of the adaptive mesh\'s smallest cell, projector pixels', parseNumberIn(0.25, 64), ADAPTIVE_DEFAULTS.smallestCell)
    .addHelpText('after', '\nExamples:\n  skyfold bake rig.yaml -o mesh.glb\n  skyfold bake rig.yaml -o mesh.mpcdi --alpha-resolution full\n  skyfold bake rig.yaml -o mesh.glb -o mesh.mpcdi -o mesh.csv --feather 2\n  skyfold bake rig.yaml -o mesh.glb --grid 321x201 --json')
    .action(async (rigPath: string, opts: BakeCliOptions) => {
      const rig = readRig(rigPath);
      const targets = opts.output.map((path) => {
        const format = opts.format ?? formatFromPath(path);
        if (!format) throw new UserError(`${path}: cannot tell the mesh format from the extension (expected ${MESH_FORMATS.map((f) => '.' + f).join(', ')}, or give --format)`);
        return { path, format };
      });
      if (opts.grid && (opts.grid[0] > rig.projector.resolution[0] + 1 || opts.grid[1] > rig.projector.resolution[1] + 1)) {
        throw new UserError(`--grid: at most one vertex per projector pixel (${rig.projector.resolution[0] + 1}x${rig.projector.resolution[1] + 1}), got ${opts.grid.join('x')}`);
      }
      if (opts.adaptive && !targets.some((t) => TRIANGLE_FORMATS.includes(t.format))) {
        throw new UserError('--adaptive: only .glb and .obj can carry an adaptive mesh (the other formats are grids by definition); give a .glb or .obj output');
      }
      if (!opts.adaptive && opts.smallestCell !== ADAPTIVE_DEFAULTS.smallestCell) throw new UserError('--smallest-cell: only with --adaptive');
      const { result, adaptive, pixels } = await bakeToFiles(rig, rigPath, targets, opts);
      const summary = {
        ...bakeSummary(result, targets.map((t) => t.path), rig.units),
        alphaResolution: opts.alphaResolution,
        ...(adaptive ? { adaptive: adaptiveSummary(adaptive, opts.smallestCell) } : {}),
      };
      if (opts.json) {
        printJson(summary);
        return;
      }
      const a = result.accuracy;
      const f = (x: number) => (Number.isFinite(x) && x < 1e6 ? x.toFixed(3) : 'unbounded');
      const pct = (x: number) => `${(x * 100).toFixed(2)}%`;
      const lines = [
        `grid            ${result.mesh.cols} x ${result.mesh.rows} vertices (${a.cells} lit cells measured)`,
        `lit vertices    ${(result.litFraction * 100).toFixed(1)}%`,
        `error, p99      ${f(a.errorP99Projector)} projector px   ${f(a.errorP99Px)} dome-master px (N = ${opts.masterSize})`,
        `error, max      ${f(a.errorMaxProjector)} projector px   ${f(a.errorMaxPx)} dome-master px`,
        `as triangles    p99 ${f(a.triangles.errorP99Projector)}, max ${f(a.triangles.errorMaxProjector)} projector px (the two triangles per cell a GPU draws from the .glb)`,
        `tolerance       ${opts.tolerance} projector px; ${(a.overTolerance * 100).toFixed(2)}% of lit cells exceed it (${(a.triangles.overTolerance * 100).toFixed(2)}% as triangles)`,
        `edge            mean ${f(result.edge.mean)}, p99 ${f(result.edge.p99)}, max ${f(result.edge.max)} projector px from the exact edge (the mask's 0.5 level on the two triangles per cell, ${result.edge.samples} samples)`,
        `brightness      ${result.brightnessMin.toFixed(3)} .. ${result.brightnessMax.toFixed(3)} (strength ${opts.brightness}, floor ${opts.brightnessFloor})`,
        ...(adaptive
          ? [
              `adaptive        ${adaptive.accuracy.vertices} vertices (.glb .obj), smallest cell ${opts.smallestCell} px: within the tolerance over ${pct(adaptive.accuracy.withinTolerance)} of the lit area, p99.9 ${f(adaptive.accuracy.errorP999Projector)} projector px`,
              `uniform grid    ${adaptive.uniform.vertices} vertices: within the tolerance over ${pct(adaptive.uniform.withinTolerance)} of the lit area, p99.9 ${f(adaptive.uniform.errorP999Projector)} projector px (both measured at every lit projector pixel)`,
            ]
          : []),
        ...result.notes.map((n) => `note            ${wordNotice(n, rig.units)}`),
        ...targets.map((t) => `wrote           ${t.path} (${t.format}${pixels && (t.format === 'mpcdi' || t.format === 'png') ? ', traced at every projector pixel' : ''})`),
      ];
      writeOut(lines.join('\n') + '\n');
    });
}
