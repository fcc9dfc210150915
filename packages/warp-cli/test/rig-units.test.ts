/**
 * The rig's own units from `init` to `report`: a rig in feet reads in feet and inches in every
 * picture label, in the HTML page, in the planner's notes and in the starter file's comments; a
 * metric rig reads in metric. Labels are read from the SVG documents themselves.
 */
import { fileURLToPath } from 'node:url';
import { beforeAll, describe, expect, it } from 'vitest';
import { analyzeRig, planRig, type RigAnalysis } from '@skyfold/warp-core';
import { starterRigText } from '../src/demo-rig.js';
import { wordNotice } from '../src/messages.js';
import { loadRig } from '../src/io/document-file.js';
import { reportHtml, setUpSection } from '../src/pictures/report-page.js';
import { drawSafetyPlan } from '../src/pictures/safety-plan.js';
import { drawSideView } from '../src/pictures/side-view.js';
import type { Picture } from '../src/pictures/svg.js';

const fixture = (name: string) => fileURLToPath(new URL(`../../../fixtures/${name}`, import.meta.url));

/** The texts an SVG picture holds, as written in its data-label attributes. */
function svgTexts(svg: string): string[] {
  return [...svg.matchAll(/data-label="([^"]*)"/g)].map((m) => m[1].replace(/&#39;/g, "'").replace(/&quot;/g, '"').replace(/&amp;/g, '&'));
}

/** A metric length written in text: "0.6 m", "35 cm", "1.2m", "15 mm". */
const METRIC = /\d\s?(m|cm|mm)\b/;
/** A length in feet or inches: "2 ft", "11 in", "23.6 in". */
const IMPERIAL = /\d\s?(ft|in)\b/;

describe('a rig in feet reads in feet and inches', () => {
  let feet: RigAnalysis;
  let metric: RigAnalysis;
  const pics: Record<'feet' | 'metric', { side: Picture; plan: Picture }> = {} as never;

  beforeAll(async () => {
    const opts = { vertices: 3000, directions: { azimuths: 36, zenithSteps: 20 } };
    feet = analyzeRig(loadRig(fixture('demo-rig-ft.yaml')).rig, opts);
    metric = analyzeRig(loadRig(fixture('demo-rig.yaml')).rig, opts);
    pics.feet = { side: drawSideView(feet), plan: (await drawSafetyPlan(feet))! };
    pics.metric = { side: drawSideView(metric), plan: (await drawSafetyPlan(metric))! };
  });

  it('labels the side view in the rig units: eye heights, the floor and the scale bar', () => {
    const t = svgTexts(pics.feet.side.svg);
    expect(t.filter((s) => METRIC.test(s))).toEqual([]);
    // the eye-height bands are common practice in metres (0.6-0.9 m etc.): 0.6 m = 23.6 in rounds to 2 ft
    expect(t).toContain('eyes 2 ft to 2 ft 11 in');
    expect(t).toContain('floor, 1 ft 8 in below the springline');
    // the scale bar is a round length in the rig's units, not "1 m = 3 ft 3.37 in"
    expect(t.some((s) => /^\d+ (ft|in)$/.test(s))).toBe(true);
    const m = svgTexts(pics.metric.side.svg);
    expect(m.filter((s) => IMPERIAL.test(s))).toEqual([]);
    expect(m).toContain('eyes 0.6 m to 0.9 m');
    expect(m.some((s) => /^\d+(\.\d+)? m$/.test(s))).toBe(true);
  });

  it('keeps the side view labels apart: "azimuth 180°" and the eye heights do not overlap', () => {
    const p = pics.feet.side;
    const az = p.labels.find((l) => l.text === 'azimuth 180°')!;
    const eyes = p.labels.filter((l) => l.text.startsWith('eyes '));
    expect(eyes.length).toBe(3);
    for (const e of eyes) expect(e.box.y >= az.box.y + az.box.h || e.box.y + e.box.h <= az.box.y || e.box.x + e.box.w <= az.box.x || e.box.x >= az.box.x + az.box.w, e.text).toBe(true);
  });

  it('labels the plan views in the rig units, with the extent of each zone', () => {
    const t = svgTexts(pics.feet.plan.svg);
    expect(t.filter((s) => METRIC.test(s))).toEqual([]);
    expect(t).toContain('eyes 3 ft 7 in to 4 ft 3 in above the floor');
    // the demo's lens sits at floor-seated eye height, so the beam crosses that band (report.test.ts)
    expect(t.some((s) => /^beam: .* ft .* from the lens$/.test(s))).toBe(true);
    expect(svgTexts(pics.metric.plan.svg).filter((s) => IMPERIAL.test(s))).toEqual([]);
    // distinct zones: the beam past the mirror apart from the beam to it, and the picture's arc on the wall
    expect(t.some((s) => /^past the mirror: .* from the lens$/.test(s))).toBe(true);
    expect(t.some((s) => /^on the wall: (all around|azimuths \d+° to \d+°)$/.test(s))).toBe(true);
    const z = feet.safetyZones!;
    expect(z.pastMirror[0].some((v) => v === 1)).toBe(true);
    expect(z.pastMirror[0].some((v, k) => v === 1 && z.direct[0][k] === 0)).toBe(true);
  });

  it('writes the HTML page with no metric length for a rig in feet', () => {
    const html = reportHtml(feet.figures, [], { generator: 'test', rigFile: 'rig.yaml' });
    const text = html.replace(/<style>[\s\S]*?<\/style>/, '').replace(/<[^>]+>/g, ' ');
    expect(text.match(new RegExp(METRIC.source, 'g')) ?? []).toEqual([]);
    expect(text).toContain('seated on chairs 3 ft 7 in to 4 ft 3 in');
    const metricText = reportHtml(metric.figures, [], { generator: 'test', rigFile: 'rig.yaml' });
    expect(metricText).toContain('seated on chairs 1.1 m to 1.3 m');
  });
});

describe('the report page states the set-up it judges', () => {
  it('shows the dome, the mirror, the projector and the content at the top, in the rig units, and begins every paragraph with a capital', () => {
    const rig = loadRig(fixture('demo-rig-ft.yaml')).rig;
    const a = analyzeRig(rig, { vertices: 1500, directions: { azimuths: 24, zenithSteps: 12 } });
    const html = reportHtml(a.figures, [], { generator: 'skyfold test', rigFile: 'rig.yaml', rig });
    const setUp = setUpSection(rig).replace(/<[^>]+>/g, ' ');
    expect(html.indexOf('id="set-up"')).toBeLessThan(html.indexOf('class="cards"'));
    expect(setUp).toContain('16 ft 4.85 in across');
    expect(setUp).toContain('floor 1 ft 7.69 in below the springline');
    expect(setUp).toContain('radius 11.81 in, cap half-angle 90°; centre at (0 in, -6 ft 4.77 in, 5.91 in)');
    expect(setUp).toContain('1920 × 1200, throw ratio 1.6');
    expect(setUp).toContain('180° fisheye');
    expect(setUp.match(new RegExp(METRIC.source, 'g')) ?? []).toEqual([]);
    for (const m of html.matchAll(/<p[^>]*>\s*(?:<[^>]+>\s*)*([^<\s])/g)) expect(m[1], m[0]).toMatch(/[A-Z0-9]/);
  });
});

describe('the planner and the starter file speak the rig units', () => {
  it('words the assumed projector body in feet and inches for a rig in feet, in centimetres for one in cm', () => {
    const rig = loadRig(fixture('demo-rig-ft.yaml')).rig;
    const tiny = { vary: ['projector.position.y'], objective: 'coverage', evaluations: 6, keep: 1, vertices: 300, refineVertices: 300, reportVertices: 300 } as const;
    const bodyNote = (units: 'ft' | 'cm') => {
      const n = planRig({ ...rig, units }, tiny).notes.find((x) => x.rule === 'plan.body-assumed')!;
      return wordNotice(n, units);
    };
    // 35 × 30 × 15 cm (scoring.ts NOMINAL_BODY) in the rig's units
    expect(bodyNote('ft')).toContain('a 1 ft 1.78 in × 11.81 in × 5.91 in body is assumed');
    expect(bodyNote('cm')).toContain('a 35 cm × 30 cm × 15 cm body is assumed');
  });

  it('init --units ft writes its comments and name in feet and inches', () => {
    const text = starterRigText('ft');
    const comments = text.split('\n').filter((l) => /#/.test(l) && !/^# Lengths|^# "35 cm"/.test(l)).join('\n');
    expect(comments.match(new RegExp(METRIC.source, 'g')) ?? []).toEqual([]);
    // the demo's 60 cm mirror is 23.6 in across; its 5 m dome 16.4 ft
    expect(text).toContain('# a 23.6 in hemispherical safety mirror');
    expect(text).toMatch(/^name: ".*16\.4 ft portable dome"$/m);
    expect(starterRigText('m')).toContain('# a 60 cm hemispherical safety mirror');
  });
});
