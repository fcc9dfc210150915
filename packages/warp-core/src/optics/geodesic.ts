/**
 * Geodesic domes from a few numbers (DESIGN.md "As-built domes"): the handbooks' class I icosahedral
 * method. An icosahedron with one vertex at the zenith and one of its five neighbours at azimuth 0
 * (turned by `azimuth`); each face's edges divided into ν equal parts, the points of the flat face
 * projected radially onto the sphere (Kenner, *Geodesic Math and How to Use It*, 1976, ch. 6). Faces
 * are kept at or above a height; an optional skirt drops a vertical wall from the base ring's edges to a
 * floor height. Metres and radians, world frame (z up, azimuth 0 toward +y, 90° toward +x).
 */
import type { TriangleSoup } from './dome-mesh.js';

export interface GeodesicOptions {
  /** ν, the number of parts each icosahedron edge is divided into (1 = the icosahedron). */
  frequency: number;
  /** Sphere radius, metres. */
  radius: number;
  /** Keep the faces whose three corners are all at or above this height (metres; default −radius: all). */
  keepAbove?: number;
  /**
   * Instead of keepAbove: keep the faces whose centre (the mean of its corners) lies in the top fraction f
   * of the sphere's height, at or above R(1 − 2f): 1/2 a hemisphere, 3/8 and 5/8 the usual cuts of odd
   * frequencies (a 3V gives its 75- and 105-triangle domes).
   */
  keepFraction?: number;
  /** A vertical wall from the base ring's edges down to this height (metres, below the base). */
  skirtTo?: number;
  /** Turns the whole pattern about the vertical axis, radians (toward +x from +y). */
  azimuth?: number;
}

/** One strut length of a dome: its chord factor (length ÷ radius) and how many there are. */
export interface StrutClass {
  /** 'A', 'B', ... in order of increasing length. */
  label: string;
  chordFactor: number;
  length: number;
  count: number;
}

/** One kind of triangle: its sides as strut labels (sorted), how many. */
export interface TriangleKind {
  sides: string;
  count: number;
}

export interface GeodesicDome extends TriangleSoup {
  /** Triangles of the sphere (the first `sphereTriangles` of `indices`), the rest is skirt. */
  sphereTriangles: number;
  /** Vertices of the sphere part (hubs). */
  hubs: number;
  struts: StrutClass[];
  triangleKinds: TriangleKind[];
  /** Height of the lowest kept hub (the base ring's lowest point), metres. */
  baseHeight: number;
  /** Number of skirt panels (quads, each two triangles) and the skirt's height range, when there is one. */
  skirtPanels: number;
}

const MAX_FREQUENCY = 64;

/** The 12 unit vertices of the icosahedron, one at the zenith, one neighbour at azimuth 0; and its 20 faces. */
export function icosahedron(azimuth = 0): { vertices: [number, number, number][]; faces: [number, number, number][] } {
  const zr = 1 / Math.sqrt(5); // height of the two rings of five (Kenner 1976, the icosahedron's vertices)
  const rr = 2 / Math.sqrt(5);
  const v: [number, number, number][] = [[0, 0, 1]];
  for (let k = 0; k < 5; k++) {
    const a = azimuth + (2 * Math.PI * k) / 5;
    v.push([rr * Math.sin(a), rr * Math.cos(a), zr]);
  }
  for (let k = 0; k < 5; k++) {
    const a = azimuth + (2 * Math.PI * (k + 0.5)) / 5;
    v.push([rr * Math.sin(a), rr * Math.cos(a), -zr]);
  }
  v.push([0, 0, -1]);
  const f: [number, number, number][] = [];
  for (let k = 0; k < 5; k++) {
    const u0 = 1 + k;
    const u1 = 1 + ((k + 1) % 5);
    const l0 = 6 + k;
    const l1 = 6 + ((k + 1) % 5);
    f.push([0, u0, u1]); // cap
    f.push([u0, l0, u1]); // band, pointing down
    f.push([u1, l0, l1]); // band, pointing up
    f.push([11, l1, l0]); // bottom cap
  }
  return { vertices: v, faces: f };
}

/**
 * The class I geodesic dome of the options. Throws RangeError on a frequency or size out of range
 * (callers validate first and phrase their own messages).
 */
export function geodesicDome(o: GeodesicOptions): GeodesicDome {
  const nu = o.frequency;
  if (!Number.isInteger(nu) || nu < 1 || nu > MAX_FREQUENCY) throw new RangeError(`frequency must be a whole number from 1 to ${MAX_FREQUENCY}`);
  if (!(o.radius > 0) || !Number.isFinite(o.radius)) throw new RangeError('radius must be a positive number');
  const R = o.radius;
  const { vertices, faces } = icosahedron(o.azimuth ?? 0);
  // vertices shared across faces are found by their rounded unit position
  const key = (x: number, y: number, z: number) => `${Math.round(x * 1e9)},${Math.round(y * 1e9)},${Math.round(z * 1e9)}`;
  const unit: number[] = [];
  const byKey = new Map<string, number>();
  const vertexOf = (p: [number, number, number]): number => {
    const l = Math.hypot(p[0], p[1], p[2]);
    const x = p[0] / l, y = p[1] / l, z = p[2] / l;
    const k = key(x, y, z);
    let id = byKey.get(k);
    if (id === undefined) {
      id = unit.length / 3;
      unit.push(x, y, z);
      byKey.set(k, id);
    }
    return id;
  };
  const tris: number[] = [];
  for (const [ia, ib, ic] of faces) {
    const A = vertices[ia], B = vertices[ib], C = vertices[ic];
    const ids: number[][] = [];
    for (let i = 0; i <= nu; i++) {
      ids.push([]);
      for (let j = 0; i + j <= nu; j++) {
        const p: [number, number, number] = [0, 0, 0];
        for (let a = 0; a < 3; a++) p[a] = A[a] + (i / nu) * (B[a] - A[a]) + (j / nu) * (C[a] - A[a]);
        ids[i].push(vertexOf(p));
      }
    }
    for (let i = 0; i < nu; i++) {
      for (let j = 0; i + j < nu; j++) {
        tris.push(ids[i][j], ids[i + 1][j], ids[i][j + 1]);
        if (i + j + 1 < nu) tris.push(ids[i + 1][j], ids[i + 1][j + 1], ids[i][j + 1]);
      }
    }
  }
  // keep the faces at or above the cut (a hair of slack for hubs exactly on it)
  const cut = (o.keepAbove ?? -R) / R - 1e-9;
  const centreCut = o.keepFraction === undefined ? undefined : 1 - 2 * o.keepFraction - 1e-9;
  const kept: number[] = [];
  for (let t = 0; t < tris.length; t += 3) {
    const za = unit[3 * tris[t] + 2], zb = unit[3 * tris[t + 1] + 2], zc = unit[3 * tris[t + 2] + 2];
    const keep = centreCut === undefined ? za >= cut && zb >= cut && zc >= cut : (za + zb + zc) / 3 >= centreCut;
    if (keep) kept.push(tris[t], tris[t + 1], tris[t + 2]);
  }
  if (kept.length === 0) throw new RangeError('no face lies at or above the cut');
  // renumber the hubs the kept faces use
  const remap = new Int32Array(unit.length / 3).fill(-1);
  const pos: number[] = [];
  const idx: number[] = [];
  for (const id of kept) {
    if (remap[id] < 0) {
      remap[id] = pos.length / 3;
      pos.push(R * unit[3 * id], R * unit[3 * id + 1], R * unit[3 * id + 2]);
    }
    idx.push(remap[id]);
  }
  const hubs = pos.length / 3;
  const sphereTriangles = idx.length / 3;
  let baseHeight = Infinity;
  for (let i = 2; i < pos.length; i += 3) baseHeight = Math.min(baseHeight, pos[i]);

  // struts: every edge once; classes by chord length
  const edges = new Map<string, [number, number]>();
  const edgeUse = new Map<string, number>();
  for (let t = 0; t < idx.length; t += 3) {
    for (let e = 0; e < 3; e++) {
      const a = idx[t + e], b = idx[t + ((e + 1) % 3)];
      const k = a < b ? `${a},${b}` : `${b},${a}`;
      edges.set(k, a < b ? [a, b] : [b, a]);
      edgeUse.set(k, (edgeUse.get(k) ?? 0) + 1);
    }
  }
  const len = (a: number, b: number) => Math.hypot(pos[3 * a] - pos[3 * b], pos[3 * a + 1] - pos[3 * b + 1], pos[3 * a + 2] - pos[3 * b + 2]);
  const lengths = [...edges.values()].map(([a, b]) => len(a, b) / R).sort((x, y) => x - y);
  const classes: number[] = []; // chord factors of the classes
  for (const c of lengths) if (classes.length === 0 || c - classes[classes.length - 1] > 1e-7) classes.push(c);
  const labelOf = (c: number) => {
    let best = 0;
    for (let i = 1; i < classes.length; i++) if (Math.abs(classes[i] - c) < Math.abs(classes[best] - c)) best = i;
    return best;
  };
  const label = (i: number) => (i < 26 ? String.fromCharCode(65 + i) : `S${i + 1}`);
  const strutCount = new Array<number>(classes.length).fill(0);
  for (const c of lengths) strutCount[labelOf(c)]++;
  const struts: StrutClass[] = classes.map((c, i) => ({ label: label(i), chordFactor: c, length: c * R, count: strutCount[i] }));
  const kinds = new Map<string, number>();
  for (let t = 0; t < idx.length; t += 3) {
    const s = [0, 1, 2].map((e) => labelOf(len(idx[t + e], idx[t + ((e + 1) % 3)]) / R)).sort((a, b) => a - b).map(label).join(label(classes.length - 1).length > 1 ? ' ' : '');
    kinds.set(s, (kinds.get(s) ?? 0) + 1);
  }
  const triangleKinds = [...kinds.entries()].sort(([a], [b]) => (a < b ? -1 : 1)).map(([sides, count]) => ({ sides, count }));

  // the skirt: a vertical quad under every edge of the base ring (an edge used by one face, at the bottom)
  let skirtPanels = 0;
  if (o.skirtTo !== undefined) {
    const floor = o.skirtTo;
    if (!(floor < baseHeight)) throw new RangeError('the skirt must reach below the base ring');
    const below = new Map<number, number>();
    const drop = (a: number) => {
      let id = below.get(a);
      if (id === undefined) {
        id = pos.length / 3;
        pos.push(pos[3 * a], pos[3 * a + 1], floor);
        below.set(a, id);
      }
      return id;
    };
    // the base ring: boundary edges; on a full sphere there are none
    for (const [k, [a, b]] of edges) {
      if (edgeUse.get(k) !== 1) continue;
      idx.push(a, b, drop(b), a, drop(b), drop(a));
      skirtPanels++;
    }
  }
  return {
    positions: Float64Array.from(pos),
    indices: Uint32Array.from(idx),
    sphereTriangles,
    hubs,
    struts,
    triangleKinds,
    baseHeight,
    skirtPanels,
  };
}

/** The triangles as Wavefront OBJ text (one `v` line per vertex, 1-based `f` lines), lengths as given. */
export function geodesicObj(dome: TriangleSoup, scale = 1, comments: string[] = []): string {
  const out: string[] = comments.map((c) => `# ${c}`);
  const p = dome.positions;
  const fmt = (x: number) => {
    const s = (x * scale).toFixed(9).replace(/\.?0+$/, '');
    return s === '-0' ? '0' : s;
  };
  for (let i = 0; i < p.length; i += 3) out.push(`v ${fmt(p[i])} ${fmt(p[i + 1])} ${fmt(p[i + 2])}`);
  const f = dome.indices;
  for (let t = 0; t < f.length; t += 3) out.push(`f ${f[t] + 1} ${f[t + 1] + 1} ${f[t + 2] + 1}`);
  return out.join('\n') + '\n';
}
