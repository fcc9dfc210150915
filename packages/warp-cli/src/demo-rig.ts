/**
 * The demo scenario, invented for skyfold: the Larkspur Hill Astronomy Club's 5 m portable dome, a
 * 60 cm hemispherical safety mirror near the back wall and a WUXGA projector on a low table.
 */
import { formatLength, type LengthUnit } from '@skyfold/warp-core';

/** Demo rig values in metres. */
export const DEMO_RIG = {
  name: 'Larkspur Hill Astronomy Club - 5 m portable dome',
  domeDiameter: 5.0,
  floor: 0.5,
  mirrorRadius: 0.3,
  mirrorCenter: [0, -1.95, 0.15],
  mirrorAxis: [0, 1, 1],
  projectorPosition: [0, -0.75, 0.1],
  projectorLookAt: [0, -1.95, 0.25],
  resolution: [1920, 1200],
  throwRatio: 1.6,
  lensShift: [0, 0],
} as const;

function len(m: number, units: LengthUnit): string {
  if (units === 'ft' || units === 'in') return JSON.stringify(formatLength(m, 'ft'));
  return String(Number((m / (units === 'm' ? 1 : units === 'cm' ? 0.01 : 0.001)).toFixed(4)));
}

function point(p: readonly number[], units: LengthUnit): string {
  return `[${p.map((x) => len(x, units)).join(', ')}]`;
}

/** A commented starter rig file for the demo scenario, in metres or feet-and-inches. */
export function starterRigText(units: 'm' | 'ft'): string {
  const d = DEMO_RIG;
  const u = units === 'ft' ? 'ft' : 'm';
  const L = (m: number) => len(m, u);
  const P = (p: readonly number[]) => point(p, u);
  // the scenario's own words in the file's units: a 16.4 ft dome, a 23.6 in mirror
  const name = units === 'ft' ? d.name.replace('5 m', `${(d.domeDiameter / 0.3048).toFixed(1)} ft`) : d.name;
  const mirrorSize = units === 'ft' ? `${((2 * d.mirrorRadius) / 0.0254).toFixed(1)} in` : `${Math.round(200 * d.mirrorRadius)} cm`;
  return `# skyfold rig file: ${name}.
# Frame: origin at the centre of the dome's springline circle, +z up (zenith), +y toward the front
# of the dome, +x to the right of a viewer facing the front. Azimuth 0 = front, 90 = right.
# Lengths: a bare number is in \`units\`; a string carries its own unit ("8 ft", "19 in", "7 ft 6 in",
# "35 cm", "2.4 m"). Angles are degrees. Measure with a tape and refine with \`skyfold fit\`.
# Safety: never look into the beam; secure the mirror and its stand so they cannot tip; keep aisles
# and exits clear; local fire and building codes and the projector maker's instructions come first.
name: "${name}"
units: ${u}

dome:
  diameter: ${L(d.domeDiameter)}      # or radius:
  floor: ${L(d.floor)}         # how far the floor lies below the springline

mirror:
  # a ${mirrorSize} hemispherical safety mirror; give \`cap: {width, depth}\` instead of \`radius\` for a
  # shallower cap (radius from the sagitta relation)
  radius: ${L(d.mirrorRadius)}
  center: ${P(d.mirrorCenter)}   # near the back wall, on a stand
  axis: [${d.mirrorAxis.join(', ')}]        # out of the reflective face, tilted toward the front (any length)
  capAngle: 90           # half-angle of the reflective cap; 90 = hemisphere

projector:
  position: ${P(d.projectorPosition)}   # the lens, on a low table near the centre
  lookAt: ${P(d.projectorLookAt)}     # any point on the optical axis
  roll: 0                # degrees; 180 = hung upside down
  resolution: [${d.resolution.join(', ')}] # WUXGA
  throwRatio: ${d.throwRatio}        # throw distance / image width
  lensShift: [${d.lensShift.join(', ')}]      # image offset in fractions of width and height; +y moves it up
  # aperture: ${units === 'ft' ? '"0.4 in"' : '"10 mm"'}    # optional: the lens's entrance-pupil diameter (focal length / f-number), for the focus blur

content:
  fov: 180               # the dome master's field of view, degrees
  eye: [0, 0, 0]         # the point the content is mapped for (the dome centre)
`;
}
