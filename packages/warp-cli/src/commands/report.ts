/** `skyfold report`: coverage, resolution, brightness, spill, focus and safety figures, pictures and an HTML page. */
import { join } from 'node:path';
import type { Command } from 'commander';
import { analyzeRig, describeArc, formatLength, REPORT_DEFAULTS, sweepPlacement, type ReportFigures } from '@skyfold/warp-core';
import { drawPlacementSweep } from '../pictures/placement-sweep.js';
import { reportHtml, type HtmlPicture } from '../pictures/report-page.js';
import { reportPictures } from '../pictures/report-pictures.js';
import type { RasterImage } from '../pictures/raster.js';
import { svgToPng } from '../pictures/render.js';
import type { Picture } from '../pictures/svg.js';
import { readRig } from '../io/document-file.js';
import { encodePng } from '../io/image-codec.js';
import { writeFileAtomic } from '../io/output-file.js';
import { UserError } from '../errors.js';
import { lengthText, printJson } from '../format.js';
import { parsePositiveInt } from '../options.js';
import { VERSION } from '../version.js';
import { writeOut } from '../io/run-context.js';

/** The figures as a person reads them, one line each. */
export function reportSummary(f: ReportFigures): string[] {
  const pct = (x: number | null, d = 1) => (x === null ? '-' : `${(x * 100).toFixed(d)}%`);
  const n = (x: number | null, d = 2) => (x === null ? '-' : x.toFixed(d));
  const L = (m: number | null) => (m === null ? '-' : lengthText(m, f.rig.units as never, 2));
  const r = f.resolution;
  const lines = [
    `coverage        ${pct(f.coverage.fraction, 2)} of the content's dome lit (inverse check ${pct(f.coverage.fractionByInverse, 2)})${f.coverage.bodyShadow ? `; body shadow ${pct(f.coverage.bodyShadow, 2)}` : ''}`,
    `pixels          ${pct(f.pixels.lit)} on the content, ${pct(f.pixels.mirrorMiss)} miss the mirror, ${pct(f.pixels.belowHorizon)} below the springline, ${pct(f.pixels.outsideContent)} outside the content`,
    `resolution      ${n(r.median)} arcmin/px median (5-95%: ${n(r.p5)}-${n(r.p95)}; ideal ${n(r.ideal)})${r.worst ? `, coarsest ${n(r.worst.arcmin)} at az ${r.worst.azimuth === null ? '-' : Math.round(r.worst.azimuth) % 360}, alt ${n(r.worst.altitude, 0)}` : ''}`,
    `brightness      ${n(f.brightness.ratioBefore)}:1 brightest to dimmest; ${n(f.brightness.ratioAfter)}:1 after compensation, costing ${pct(f.brightness.lightLost, 0)} of the light`,
    `spill           past the mirror ${pct(f.spill.pastMirror.share)}${f.spill.pastMirror.azimuths ? ` (lands ${describeArc(f.spill.pastMirror.azimuths)})` : ''}; below the springline ${pct(f.spill.belowHorizon.share)}`,
    `focus           mirror ${L(f.focus.depth.near)} to ${L(f.focus.depth.far)} from the lens (${L(f.focus.depth.range)} deep); focus at ${L(f.focus.bestFocus)}${f.focus.blur ? `; blur ${n(f.focus.blur.pixelsP95)} px (95%)` : ''}`,
    ...f.focus.warnings.map((w) => `focus warning   ${w}`),
    ...f.safety.findings.map((x) => `safety ${x.level.padEnd(8)} ${x.text}`),
    ...(f.facets
      ? [
          `as built        the sphere of dome.radius would misplace content by ${n(f.facets.medianDegrees)}° median, ${n(f.facets.worstDegrees)}° worst (${n(f.facets.medianMasterPx, 1)} and ${n(f.facets.worstMasterPx, 1)} px of a ${f.facets.masterSize}² dome master) on this mesh`,
        ]
      : []),
  ];
  return lines;
}

export function registerReport(program: Command): void {
  program
    .command('report')
    .description('judge a set-up: coverage, resolution, brightness, spill, focus and safety, with pictures and an HTML page')
    .argument('<rig>', 'rig file (YAML or JSON), or a .glb baked by skyfold')
    .requiredOption('-o, --output <dir>', 'folder for report.html, report.json and the PNG pictures')
    .option('--rays <n>', 'about how many projector-frame points to trace', (s) => parsePositiveInt(s), REPORT_DEFAULTS.vertices)
    .option('--json', 'print every figure as JSON (stable keys: coverage, pixels, resolution, brightness, spill, focus, safety, facets)')
    .addHelpText('after', '\nExamples:\n  skyfold report rig.yaml -o report/\n  skyfold report rig.yaml -o report/ --json > figures.json')
    .action(async (rigPath: string, opts: { output: string; rays: number; json?: boolean }) => {
      const rig = readRig(rigPath);
      if (opts.rays < 1000 || opts.rays > 2_000_000) throw new UserError(`--rays: expected a number from 1000 to 2000000, got ${opts.rays}`);
      const analysis = analyzeRig(rig, { vertices: opts.rays, lengthText: (m, digits) => lengthText(m, rig.units, digits) });
      const pics = await reportPictures(analysis);
      const items: [string, RasterImage | Picture | null, string, string][] = [
        ['side-view.png', pics.side, 'Side view of the set-up', 'The dome, the floor and the eye-height bands, the mirror (its reflective cap drawn thick), the projector, and rays down the middle of the frame. Where the beam between lens and mirror runs at eye height it is drawn red.'],
        ['safety-plan.png', pics.plan, 'Plan view of where light meets eye height', 'For each eye-height band, seen from above: red where the beam itself crosses it, amber where the reflected picture does.'],
        ['frame.png', pics.frame, 'What each projector pixel lights', 'The projector frame as the projector shows it, coloured by where each pixel’s light goes, with altitude on the dome every 15°.'],
        ['resolution.png', pics.resolution, 'Resolution on the dome', 'Arcminutes per projector pixel in the dome master’s orientation (front at the bottom); lighter is sharper; hatched grey is not lit.'],
        ['brightness.png', pics.brightness, 'Brightness before compensation', 'Relative brightness of the lit dome before the warp mesh evens it out; 1 = brightest.'],
        ['placement-sweep.png', drawPlacementSweep(sweepPlacement(rig), rig.units), 'Where the projector could stand', 'Coverage, resolution and lit share with the projector moved toward or away from the mirror and up or down, the mirror and the aim as now, and where the room frees the mirror\'s height a second row over that height (the planner\'s scoring and room; `skyfold plan` searches further). Ringed: the current placement; crossed: the best cell.'],
      ];
      const files: string[] = [];
      const htmlPics: HtmlPicture[] = [];
      try {
        for (const [name, img, alt, caption] of items) {
          if (!img) continue;
          const svg = 'svg' in img ? img.svg : undefined;
          const png = svg === undefined ? await encodePng({ ...(img as RasterImage), channels: 4 }, 9) : await svgToPng(svg);
          const path = join(opts.output, name);
          writeFileAtomic(path, png);
          files.push(path);
          htmlPics.push({ src: svg === undefined ? `data:image/png;base64,${png.toString('base64')}` : name, svg, alt, caption, width: img.width, height: img.height });
        }
        const jsonPath = join(opts.output, 'report.json');
        writeFileAtomic(jsonPath, JSON.stringify(analysis.figures, null, 2) + '\n');
        files.push(jsonPath);
        const htmlPath = join(opts.output, 'report.html');
        writeFileAtomic(htmlPath, reportHtml(analysis.figures, htmlPics, { generator: `skyfold ${VERSION}`, rigFile: rigPath, rig }));
        files.push(htmlPath);
      } catch (e) {
        if (e instanceof UserError) throw e;
        throw new UserError(`${opts.output}: cannot write the report: ${(e as Error).message}`);
      }
      if (opts.json) {
        printJson({ ...analysis.figures, files });
        return;
      }
      writeOut([...reportSummary(analysis.figures), ...files.map((f) => `wrote           ${f}`)].join('\n') + '\n');
    });
}
