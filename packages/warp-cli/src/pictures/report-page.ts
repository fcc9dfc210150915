/**
 * The report as one self-contained HTML page: the figures, the safety findings and the pictures
 * (given as data: URIs by the caller), with inline styles and no scripts or outside resources, so it
 * opens in any browser with nothing else installed.
 */
import { lengthLabel } from './scales.js';
import { azAltFromDirection, describeArc, EYE_BANDS, RAD, type LengthUnit, type ReportFigures, type Rig } from '@skyfold/warp-core';
import { lengthText } from '../format.js';

export interface HtmlPicture {
  /** A data: URI, or the PNG file's path relative to the page. */
  src: string;
  /** The picture as an SVG document, inlined in the page (then `src` is only linked). */
  svg?: string;
  alt: string;
  caption: string;
  width: number;
  height: number;
}

export function escapeHtml(s: string): string {
  return s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);
}

const pct = (x: number | null, d = 1) => (x === null ? '–' : `${(x * 100).toFixed(d)}%`);
const num = (x: number | null, d = 2) => (x === null ? '–' : x.toFixed(d));

/** A text as a sentence: its first letter a capital. */
function sentence(s: string): string {
  return s.charAt(0).toUpperCase() + s.slice(1);
}

/** A point in the rig's units: "(0 in, -6 ft 4.77 in, 5.91 in)". */
function pointText(p: readonly number[], units: LengthUnit): string {
  return `(${p.map((x) => lengthText(x, units, 2)).join(', ')})`;
}

/** A direction as azimuth and elevation in degrees. */
function aimText(d: readonly number[]): string {
  const [az, alt] = azAltFromDirection([d[0], d[1], d[2]]);
  return `azimuth ${((az * RAD + 360) % 360).toFixed(0)}°, ${(alt * RAD).toFixed(0)}° up`;
}

/** The set-up the report judges, at the top of the page, in the rig's units. */
export function setUpSection(rig: Rig): string {
  const u = rig.units;
  const L = (m: number) => lengthText(m, u, 2);
  const e = escapeHtml;
  const { projector: p, content } = rig;
  const dome = rig.dome;
  const mirror = rig.mirror;
  const forward = [p.lookAt[0] - p.position[0], p.lookAt[1] - p.position[1], p.lookAt[2] - p.position[2]];
  const rows: [string, string][] = [
    ['Dome', `${L(2 * dome.radius)} across (radius ${L(dome.radius)})${dome.floor !== undefined ? `; floor ${L(dome.floor)} below the springline` : '; floor not given'}${dome.mesh ? `; as built: ${dome.mesh.source?.file ?? 'a triangle mesh'}` : ''}`],
    ['Mirror', `radius ${L(mirror.radius)}, cap half-angle ${(mirror.capAngle * RAD).toFixed(0)}°; centre at ${pointText(mirror.center, u)}, facing ${aimText(mirror.axis)}`],
    [
      'Projector',
      `${p.resolution[0]} × ${p.resolution[1]}, throw ratio ${p.throwRatio}, lens shift ${p.lensShift.join(', ')}; lens at ${pointText(p.position, u)}, aimed at ${aimText(forward)}, roll ${(p.roll * RAD).toFixed(1)}°` +
        `${p.body ? `; body ${L(p.body.width)} × ${L(p.body.length)} × ${L(p.body.height)}` : '; body not given'}${p.aperture !== undefined ? `; entrance pupil ${L(p.aperture)}` : ''}`,
    ],
    ['Content', `${(content.fov * RAD).toFixed(0)}° fisheye, mapped for the eye at ${pointText(content.eye, u)}`],
  ];
  return `<h2 id="set-up">The set-up</h2>
<table class="set-up">
${rows.map(([k, v]) => `<tr><th scope="row">${e(k)}</th><td>${e(v)}</td></tr>`).join('\n')}
</table>
<p class="note">Frame: origin at the centre of the springline circle, +z up, +y toward the front (azimuth 0), +x to the right.</p>`;
}

export function reportHtml(f: ReportFigures, pictures: readonly HtmlPicture[], meta: { generator: string; rigFile: string; rig?: Rig }): string {
  const units = f.rig.units as LengthUnit;
  const L = (m: number | null) => (m === null ? '–' : lengthText(m, units, 2));
  const e = escapeHtml;
  const row = (k: string, v: string, note = '') => `<tr><th scope="row">${e(k)}</th><td>${e(v)}</td><td class="note">${e(note)}</td></tr>`;
  const card = (label: string, value: string, note: string) => `<div class="card"><div class="value">${e(value)}</div><div class="label">${e(label)}</div><div class="note">${e(note)}</div></div>`;
  const res = f.resolution;
  const b = f.brightness;
  const fo = f.focus;
  const sp = f.spill;
  const gapsText = (g: [number, number][]) => (g.length === 0 ? 'none' : g.map(([a, z]) => `${a.toFixed(1)}°–${z.toFixed(1)}°`).join(', '));
  const azRows = f.coverage.byAzimuth
    .filter((a) => Math.round(a.azimuth) % 15 === 0)
    .map((a) => `<tr><td>${a.azimuth.toFixed(0)}°</td><td>${a.lowest === null ? '–' : a.lowest.toFixed(1) + '°'}</td><td>${a.highest === null ? '–' : a.highest.toFixed(1) + '°'}</td><td>${e(gapsText(a.gaps))}</td></tr>`)
    .join('\n');
  const eyeHeights = EYE_BANDS.map((b) => `${b.label} ${lengthLabel(b.from, units)} to ${lengthLabel(b.to, units)}`).join(', ');
  const findings = f.safety.findings.map((x) => `<li class="${x.level}"><strong>${x.level}</strong> ${e(x.text)}</li>`).join('\n');
  const cautions = f.safety.cautions.map((c) => `<li>${e(c)}</li>`).join('\n');
  const figs = pictures
    .map((p) =>
      p.svg === undefined
        ? `<figure><img src="${e(p.src)}" alt="${e(p.alt)}" width="${p.width}" height="${p.height}"><figcaption>${e(p.caption)}</figcaption></figure>`
        : `<figure>${p.svg.replace(/^<svg /, '<svg class="picture" ')}<figcaption>${e(p.caption)} <a href="${e(p.src)}">PNG</a></figcaption></figure>`,
    )
    .join('\n');
  const spillPart = (name: string, s: ReportFigures['spill']['pastMirror']) =>
    row(name, pct(s.share), s.azimuths ? `lands ${describeArc(s.azimuths)}; on the dome ${pct(s.onDome)}, wall ${pct(s.onWall)}, floor ${pct(s.onFloor)} of the frame` : 'none');
  return `<!doctype html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>skyfold report: ${e(f.rig.name ?? meta.rigFile)}</title>
<style>
:root { --ink: #22252e; --faint: #6b7280; --paper: #fafaf7; --line: #dcdcd6; --danger: #b3261e; --caution: #a15c00; --note: #475569; }
* { box-sizing: border-box; }
body { margin: 0; font: 15px/1.5 system-ui, -apple-system, "Segoe UI", sans-serif; color: var(--ink); background: var(--paper); }
main { max-width: 1060px; margin: 0 auto; padding: 28px 22px 60px; }
h1 { font-size: 26px; margin: 0 0 4px; }
h2 { font-size: 19px; margin: 34px 0 10px; padding-bottom: 4px; border-bottom: 1px solid var(--line); }
.sub { color: var(--faint); margin: 0 0 18px; }
.cards { display: grid; grid-template-columns: repeat(auto-fit, minmax(180px, 1fr)); gap: 12px; }
.card { background: #fff; border: 1px solid var(--line); border-radius: 8px; padding: 12px 14px; }
.card .value { font-size: 24px; font-weight: 650; }
.card .label { font-weight: 600; }
.card .note, td.note { color: var(--faint); font-size: 13px; }
table { border-collapse: collapse; width: 100%; background: #fff; border: 1px solid var(--line); }
th, td { text-align: left; padding: 5px 10px; border-bottom: 1px solid var(--line); vertical-align: top; }
th[scope=row] { font-weight: 600; width: 30%; }
ul.findings { list-style: none; padding: 0; }
ul.findings li { background: #fff; border: 1px solid var(--line); border-left: 6px solid var(--note); border-radius: 6px; padding: 8px 12px; margin: 8px 0; }
ul.findings li.danger { border-left-color: var(--danger); }
ul.findings li.caution { border-left-color: var(--caution); }
ul.findings strong { text-transform: uppercase; font-size: 12px; letter-spacing: .05em; margin-right: 6px; }
li.danger strong { color: var(--danger); } li.caution strong { color: var(--caution); } li.note strong { color: var(--note); }
figure { margin: 18px 0; background: #fff; border: 1px solid var(--line); border-radius: 8px; padding: 10px; }
figure img, figure svg.picture { max-width: 100%; height: auto; display: block; margin: 0 auto; }
figcaption { color: var(--faint); font-size: 13px; margin-top: 6px; }
footer { color: var(--faint); font-size: 13px; margin-top: 40px; }
</style>
</head>
<body>
<main>
<h1>${e(f.rig.name ?? 'Projector, mirror and dome')}</h1>
<p class="sub">Report for <code>${e(meta.rigFile)}</code> by ${e(meta.generator)}</p>
${meta.rig ? setUpSection(meta.rig) : ''}

<div class="cards">
${card('Dome lit', pct(f.coverage.fraction), `of the content's dome solid angle (check: ${pct(f.coverage.fractionByInverse)} via the inverse)`)}
${card('Resolution', `${num(res.median, 1)}′/px`, `median; 5–95%: ${num(res.p5, 1)}–${num(res.p95, 1)}′ (ideal ${num(res.ideal, 1)}′)`)}
${card('Brightness spread', `${num(b.ratioBefore, 1)} : 1`, `brightest to dimmest; after compensation ${num(b.ratioAfter, 2)} : 1, costing ${pct(b.lightLost, 0)} of the light`)}
${card('Pixels on the content', pct(f.pixels.lit), `past the mirror ${pct(f.pixels.mirrorMiss)}, below the springline ${pct(f.pixels.belowHorizon)}`)}
${card('Focus depth', L(fo.depth.range), `mirror ${L(fo.depth.near)} to ${L(fo.depth.far)} from the lens; focus at ${L(fo.bestFocus)}`)}
</div>

<h2 id="safety">Safety</h2>
<ul class="findings">
${findings}
</ul>
<p><strong>Always:</strong></p>
<ul>
${cautions}
</ul>
<p class="note">Eye heights above the floor, ${e(f.safety.source)}: ${e(eyeHeights)}.</p>

<h2>Pictures</h2>
${figs}

<h2>Coverage</h2>
<table>
${row('Lit share of the dome', pct(f.coverage.fraction, 2), 'solid angle seen from the eye point, within the content’s field of view, from the projector grid')}
${row('Same, the inverse way', pct(f.coverage.fractionByInverse, 2), 'dome directions sampled and traced back to the projector')}
${row('Body shadow', f.coverage.bodyShadow === null ? 'no body given' : pct(f.coverage.bodyShadow, 2), 'share of the dome the projector’s own body hides')}
</table>
<p>Lowest and highest lit altitude by azimuth (every 15°; the JSON has every 5°):</p>
<table>
<tr><th>azimuth</th><th>lowest lit</th><th>highest lit</th><th>unlit gaps</th></tr>
${azRows}
</table>

<h2>Pixels</h2>
<table>
${row('Projector', `${f.pixels.resolution[0]} × ${f.pixels.resolution[1]}`)}
${row('Light the content on the dome', pct(f.pixels.lit))}
${row('On the dome, outside the content', pct(f.pixels.outsideContent))}
${row('Below the springline', pct(f.pixels.belowHorizon), 'reflected onto the wall, floor or audience')}
${row('Miss the mirror', pct(f.pixels.mirrorMiss), 'the beam goes straight on')}
${row('Hidden by the projector body', pct(f.pixels.shadow))}
</table>

<h2>Resolution</h2>
<table>
${row('Median', `${num(res.median)} arcmin per projector pixel`, 'the square root of one pixel’s solid angle seen from the eye point')}
${row('5th – 95th percentile', `${num(res.p5)} – ${num(res.p95)} arcmin`)}
${row('Coarsest', res.worst ? `${num(res.worst.arcmin)} arcmin at azimuth ${res.worst.azimuth === null ? '–' : Math.round(res.worst.azimuth) % 360}°, altitude ${num(res.worst.altitude, 0)}°` : '–', res.worst ? `projector pixel ${res.worst.pixel.join(', ')}` : '')}
${res.byAltitude.map((a) => row(`Altitude ${a.from}°–${a.to}°`, a.median === null ? 'not lit' : `${num(a.median)} arcmin (median)`, `${pct(a.share)} of the lit pixels`)).join('\n')}
${row('Ideal', `${num(res.ideal)} arcmin`, 'if every pixel fell evenly on the content’s dome')}
</table>

<h2>Brightness</h2>
<table>
${row('Brightest ÷ dimmest, as projected', `${num(b.ratioBefore)} : 1`, `1st to 99th percentile of the lit pixels (all of them: ${num(b.ratioBeforeExtreme)} : 1)`)}
${row('After compensation', `${num(b.ratioAfter)} : 1`, `strength ${b.strength}, floor ${b.floor}`)}
${row('Light given up', pct(b.lightLost), 'share of the lit pixels’ light the compensation removes')}
${row('Held at the floor', pct(b.atFloor), 'lit pixels the compensation cannot dim further')}
</table>

<h2>Stray light</h2>
<table>
${spillPart('Past the mirror', sp.pastMirror)}
${spillPart('Below the springline', sp.belowHorizon)}
${row('Outside the content', pct(sp.outsideContent.share))}
</table>
<p class="note">${e(sentence(sp.note))}. Heights are measured from the ${e(sp.heightsFrom)}.</p>

<h2>Focus</h2>
<table>
${row('Lens to mirror, along the rays', `${L(fo.distance.min)} – ${L(fo.distance.max)}`, `median ${L(fo.distance.median)}`)}
${row('Depth along the lens axis', `${L(fo.depth.near)} – ${L(fo.depth.far)}`, `${L(fo.depth.range)} deep`)}
${row('Best focus', L(fo.bestFocus), 'halves the worst defocus at both ends')}
${row('Blur at best focus', fo.blur ? `${num(fo.blur.pixelsP95)} px (95%), ${num(fo.blur.pixelsMax)} px worst` : 'give projector.aperture (the lens’s entrance-pupil diameter: focal length ÷ f-number) for an estimate', fo.blur ? `${num(fo.blur.arcminP95)} arcmin on the dome (95%)` : '')}
${fo.warnings.map((w) => row('Warning', w)).join('\n')}
</table>

${
  f.facets
    ? `<h2>The dome as built</h2>
<table>
${row('Sphere model misplaces content by', `${num(f.facets.medianDegrees)}° median, ${num(f.facets.worstDegrees)}° worst`, `${num(f.facets.medianMasterPx)} and ${num(f.facets.worstMasterPx)} px of a ${f.facets.masterSize}² dome master`)}
</table>
<p class="note">The rig traces the mesh (dome.mesh); this is how far the nominal sphere of dome.radius would put the light instead, seen from the content's eye, over ${f.facets.samples} lit points.</p>
`
    : ''
}
<footer>Figures from a coarse trace of the projector frame and a sampling of dome directions; see the JSON file for every figure under stable keys.
Colour map: skyfold “dusk”, lightness rising evenly from dark (low) to light (high).</footer>
</main>
</body>
</html>
`;
}
