/**
 * Measurement documents (the parsed YAML/JSON of a measurement file) for `fit`: tape distances
 * between named points, observations of where projected markers landed on the dome, and which rig
 * quantities to solve. Same rules and error style as rig documents: lengths in the file's `units` or
 * as strings with their own unit, angles in degrees, every error naming its dotted field.
 */
import { DEG, wrapDegrees } from '../math.js';
import { RigError } from '../rig/model.js';
import { checkKnownFields, didYouMean, documentUnits, FieldReader, showValue } from '../rig/document.js';
import { METRES_PER_UNIT, type LengthUnit } from '../units.js';

/** A named point of the rig a tape can reach. */
export type PointRef =
  | { kind: 'mirror.pole' }
  | { kind: 'projector.lens' }
  | { kind: 'zenith' }
  /** The springline point at this azimuth (radians). */
  | { kind: 'rim'; azimuth: number }
  /** The floor plane, straight down from the other point (needs dome.floor). */
  | { kind: 'floor' };

export interface DistanceMeasurement {
  between: [PointRef, PointRef];
  /** Metres. */
  distance: number;
  /** Metres. */
  sigma: number;
  /** "mirror.pole - rim@90", as written. */
  label: string;
  /** Dotted path of the item, e.g. "measurements[2]". */
  field: string;
}

/** Where a marker was seen: a direction from the content's eye, or a named dome point. */
export type ObservedTarget = { kind: 'direction'; azimuth: number; altitude: number } | { kind: 'zenith' } | { kind: 'rim'; azimuth: number };

export interface Observation {
  /** Continuous projector pixel coordinate (pixel centres at +0.5). */
  pixel: [number, number];
  target: ObservedTarget;
  /** Radians. */
  sigma: number;
  label: string;
  field: string;
}

/** The rig quantities `fit` can solve, in the order the solver holds them. */
export const FREE_QUANTITIES = [
  'mirror.center',
  'mirror.radius',
  'projector.position',
  'projector.lookAt',
  'projector.roll',
  'projector.throwRatio',
  'projector.lensShift',
  'dome.radius',
] as const;
export type FreeQuantity = (typeof FREE_QUANTITIES)[number];

export function isFreeQuantity(s: unknown): s is FreeQuantity {
  return typeof s === 'string' && (FREE_QUANTITIES as readonly string[]).includes(s);
}

export interface MeasurementSet {
  units: LengthUnit;
  name?: string;
  measurements: DistanceMeasurement[];
  observations: Observation[];
  /** Empty when the document leaves it to the caller (its own list of free quantities). */
  free: FreeQuantity[];
}

/** Fields a measurement document may hold, by section. */
export const MEASUREMENT_FIELDS: Readonly<Record<string, readonly string[]>> = {
  '': ['units', 'name', 'notes', 'measurements', 'observations', 'free'],
  measurement: ['between', 'distance', 'sigma', 'note'],
  observation: ['pixel', 'azimuth', 'altitude', 'at', 'sigma', 'note'],
};

/** The defaults, in one place: a few millimetres of tape, a fifth of a degree by eye (common practice). */
export const MEASUREMENT_DEFAULTS = {
  /** Metres, for files in metric units. */
  sigmaMetric: 0.005,
  /** Metres (a quarter inch), for files in feet or inches. */
  sigmaImperial: 0.25 * METRES_PER_UNIT.in,
  /** Degrees. */
  observationSigma: 0.2,
} as const;

const POINT_NAMES = ['mirror.pole', 'projector.lens', 'zenith', 'rim@AZ', 'floor'];

/** "mirror.pole", "rim@90", … → a PointRef; throws RigError naming the field. */
export function parsePointName(v: unknown, field: string): PointRef {
  if (typeof v !== 'string') throw new RigError(field, `expected a point name (${POINT_NAMES.join(', ')}), got ${showValue(v)}`);
  const s = v.trim();
  if (s === 'mirror.pole' || s === 'projector.lens' || s === 'zenith' || s === 'floor') return { kind: s };
  const rim = parseRim(s);
  if (rim !== undefined) return { kind: 'rim', azimuth: rim };
  const hint = s.startsWith('rim') ? 'rim@AZ' : didYouMean(s, ['mirror.pole', 'projector.lens', 'zenith', 'floor']);
  throw new RigError(field, `expected a point name (${POINT_NAMES.join(', ')}), got ${showValue(v)}${hint ? `; did you mean "${hint}"?` : ''}`);
}

/** "rim@90" → azimuth in radians, or undefined when the text is not of that form. */
function parseRim(s: string): number | undefined {
  const m = /^rim\s*@\s*(-?\d+(?:\.\d*)?|-?\.\d+)$/.exec(s);
  return m ? (wrapDegrees(Number(m[1])) + 0) * DEG : undefined; // + 0 turns −0 into 0
}

/** The name of a point as a person writes it. */
export function pointLabel(p: PointRef): string {
  return p.kind === 'rim' ? `rim@${Number(((p.azimuth * 180) / Math.PI).toFixed(6))}` : p.kind;
}

function list(doc: Record<string, unknown>, key: string): unknown[] {
  const v = doc[key];
  if (v === undefined || v === null) return [];
  if (!Array.isArray(v)) throw new RigError(key, `expected a list of items, got ${showValue(v)}`);
  return v;
}

function item(v: unknown, field: string, what: string): Record<string, unknown> {
  if (typeof v !== 'object' || v === null || Array.isArray(v)) throw new RigError(field, `expected ${what}, got ${showValue(v)}`);
  return v as Record<string, unknown>;
}

/**
 * A parsed measurement document → a MeasurementSet. Throws RigError naming the dotted field
 * ("measurements[2].distance: expected a positive length, got -3").
 */
export function measurementsFromDocument(input: unknown): MeasurementSet {
  if (typeof input !== 'object' || input === null || Array.isArray(input)) {
    throw new RigError('', `expected a measurement document (a mapping of measurements, observations, free), got ${showValue(input)}`);
  }
  const doc = input as Record<string, unknown>;
  checkKnownFields(doc, '', MEASUREMENT_FIELDS['']);
  const units = documentUnits(doc);
  const r = new FieldReader(units);
  const defaultSigma = units === 'ft' || units === 'in' ? MEASUREMENT_DEFAULTS.sigmaImperial : MEASUREMENT_DEFAULTS.sigmaMetric;

  const measurements = list(doc, 'measurements').map((raw, k): DistanceMeasurement => {
    const field = `measurements[${k}]`;
    const m = item(raw, field, 'an item {between: [A, B], distance: L}');
    checkKnownFields(m, field, MEASUREMENT_FIELDS.measurement);
    const b = m.between;
    if (!Array.isArray(b) || b.length !== 2) throw new RigError(`${field}.between`, `expected two point names [A, B], got ${showValue(b)}`);
    const a = parsePointName(b[0], `${field}.between[0]`);
    const c = parsePointName(b[1], `${field}.between[1]`);
    if (a.kind === 'floor' && c.kind === 'floor') throw new RigError(`${field}.between`, `expected at most one "floor", got ${showValue(b)}`);
    if (a.kind === c.kind && (a.kind !== 'rim' || (c.kind === 'rim' && a.azimuth === c.azimuth))) {
      throw new RigError(`${field}.between`, `expected two different points, got ${showValue(b)}`);
    }
    if (m.distance === undefined || m.distance === null) throw new RigError(`${field}.distance`, 'is missing');
    const distance = r.length(m.distance, `${field}.distance`, 'positive');
    const sigma = m.sigma === undefined ? defaultSigma : r.length(m.sigma, `${field}.sigma`, 'positive');
    return { between: [a, c], distance, sigma, label: `${pointLabel(a)} - ${pointLabel(c)}`, field };
  });

  const observations = list(doc, 'observations').map((raw, k): Observation => {
    const field = `observations[${k}]`;
    const o = item(raw, field, 'an item {pixel: [x, y], azimuth: A, altitude: B} or {pixel: [x, y], at: zenith}');
    checkKnownFields(o, field, MEASUREMENT_FIELDS.observation);
    if (o.pixel === undefined || o.pixel === null) throw new RigError(`${field}.pixel`, 'is missing');
    const pixel = r.pair(o.pixel, `${field}.pixel`);
    const hasDirection = o.azimuth !== undefined || o.altitude !== undefined;
    let target: ObservedTarget;
    let label: string;
    if (o.at !== undefined && hasDirection) throw new RigError(field, 'give either at or azimuth and altitude, not both');
    if (o.at !== undefined) {
      const at = o.at;
      const rim = typeof at === 'string' ? parseRim(at.trim()) : undefined;
      if (at === 'zenith') target = { kind: 'zenith' };
      else if (rim !== undefined) target = { kind: 'rim', azimuth: rim };
      else throw new RigError(`${field}.at`, `expected zenith or rim@AZ, got ${showValue(at)}`);
      label = `pixel ${pixel[0]},${pixel[1]} at ${at}`;
    } else if (hasDirection) {
      if (o.azimuth === undefined) throw new RigError(`${field}.azimuth`, 'is missing');
      if (o.altitude === undefined) throw new RigError(`${field}.altitude`, 'is missing');
      const az = r.number(o.azimuth, `${field}.azimuth`, undefined, 'an azimuth in degrees');
      const alt = r.number(o.altitude, `${field}.altitude`, (x) => x >= -90 && x <= 90, 'an altitude from -90 to 90 degrees');
      target = { kind: 'direction', azimuth: wrapDegrees(az) * DEG, altitude: alt * DEG };
      label = `pixel ${pixel[0]},${pixel[1]} at az ${az}, alt ${alt}`;
    } else {
      throw new RigError(field, 'expected where the marker was seen: at (zenith or rim@AZ), or azimuth and altitude');
    }
    const sigma = o.sigma === undefined ? MEASUREMENT_DEFAULTS.observationSigma * DEG : r.number(o.sigma, `${field}.sigma`, (x) => x > 0, 'a positive angle in degrees') * DEG;
    return { pixel, target, sigma, label, field };
  });

  const free: FreeQuantity[] = [];
  if (doc.free !== undefined && doc.free !== null) {
    const f = doc.free;
    if (!Array.isArray(f)) throw new RigError('free', `expected a list of rig quantities (${FREE_QUANTITIES.join(', ')}), got ${showValue(f)}`);
    f.forEach((q, k) => free.push(parseFreeQuantity(q, `free[${k}]`)));
    const seen = new Set<string>();
    free.forEach((q, k) => {
      if (seen.has(q)) throw new RigError(`free[${k}]`, `expected each quantity once, got ${showValue(q)} twice`);
      seen.add(q);
    });
  }

  let name: string | undefined;
  if (doc.name !== undefined) {
    if (typeof doc.name !== 'string') throw new RigError('name', `expected text, got ${showValue(doc.name)}`);
    name = doc.name;
  }
  if (doc.notes !== undefined && typeof doc.notes !== 'string') throw new RigError('notes', `expected text, got ${showValue(doc.notes)}`);
  if (measurements.length === 0 && observations.length === 0) throw new RigError('measurements', 'expected at least one measurement or observation, got none');
  return { units, name, measurements, observations, free };
}

/** One free-quantity name, checked, with a did-you-mean. */
export function parseFreeQuantity(q: unknown, field: string): FreeQuantity {
  if (isFreeQuantity(q)) return q;
  const hint = typeof q === 'string' ? didYouMean(q, FREE_QUANTITIES) : undefined;
  throw new RigError(field, `expected one of ${FREE_QUANTITIES.join(', ')}, got ${showValue(q)}${hint ? `; did you mean "${hint}"?` : ''}`);
}
