/**
 * VESA MPCDI 2.0 (Multiple Projection Common Data Interchange) package, "2d" profile: a ZIP holding
 * `mpcdi.xml`, a geometry warp PFM and an alpha map PNG, for one buffer with one region (the projector).
 *
 * What this follows, and from where (the VESA text itself was not available to read; see below):
 * - Element and attribute names and casing: root `MPCDI` with `profile`, `geometry`, `version`, `date`;
 *   `display` > `buffer id xResolution yResolution` > `region id xResolution yResolution x y xsize ysize`;
 *   `files` > `fileset region` > `geometryWarpFile` (`path`, `interpolation`) and `alphaMap` (`path`,
 *   `componentDepth`, `bitDepth`, `gammaEmbedded`). Taken from public MPCDI 2.0 readers and files:
 *   the open-source SGCT toolkit's MPCDI reader (buffer/region xResolution, fileset region=,
 *   geometryWarpFile path + interpolation "linear"), the BSD-licensed MPCDI reference library
 *   (element names, alphaMap children, archive entry "mpcdi.xml", region x/y/xsize/ysize), and a
 *   published MPCDI 2.0 example file (xResolution casing on region, alphaMap children).
 * - The warp grid's layout, VESA MPCDI 2.0 §3.6 as DESIGN.md "The warp mesh and its files" records it:
 *   a "fill layout" — the top left of the first sample is the top left of the region, the bottom right
 *   of the last sample its bottom right — so sample (i, j) of N × M stands at ((i + 0.5)/N,
 *   (j + 0.5)/M) of the region, where a GPU sampling the warp as a texture takes it whole (the
 *   reference player PyMPCDI samples it so). Not skyfold's corner-to-corner mesh: the bake traces the
 *   samples at those positions (or, without the rig, the mesh is resampled there).
 * - Warp PFM rows: the first row is the TOP of the region (§3.6.1), and what SGCT's reader states
 *   ("raster-scan order ... starts at upper-left"). This differs from netpbm's PFM definition (rows
 *   bottom to top), so this file encodes with rowOrder 'top-down'.
 * - Warp values: absolute normalized source coordinates, 0 to 1 (§3.6.2) — here the fisheye dome
 *   master's (u, v), u right, v down; the third channel an error estimate, written 0 (none given);
 *   samples with no data (the light misses the mirror) are NaN with error 1.
 *
 * Not confirmed from the standard text (public readers disagree or are silent):
 * - that the content coordinate's y axis points down (origin top-left) as ours does;
 * - the `geometry` level value for 2d (written "1");
 * - whether 2d files also need `geometricUnit`/`originOf3DData` (omitted: they describe 3D data);
 * - the exact meaning of `gammaEmbedded`: written 1.0 with alpha values in linear light, i.e. the
 *   alpha value is the linear-light factor the pixel is multiplied by (brightness·mask);
 * - samples that land beyond the content's field of view keep their (u, v) (there is data there); the
 *   alpha map is 0 at them.
 * The MPCDI reference library's own PFM I/O writes rows bottom to top relative to its memory layout
 * (its in-memory origin may be at the bottom); we follow the text's top-down order. That library
 * (MPCDI 1.0 era) also spells the resolution attributes "Xresolution"; 2.0 files use "xResolution".
 */
import { strToU8, strFromU8, unzipSync, zipSync } from 'fflate';
import sharp from 'sharp';
import { fillLayoutFromMesh, type FillLayoutGrid, type PixelSamples, type WarpMesh } from '@skyfold/warp-core';
import { decodePfm, encodePfm } from './pfm.js';
import { checkMeshSize, checkMeshValues } from './check.js';
import { encodePng } from '../io/image-codec.js';

export interface MpcdiOptions {
  /** Buffer id (default "skyfold"). */
  bufferId?: string;
  /** Region id, one projector (default "projector"). */
  regionId?: string;
  /** Alpha map sample depth (default 8, the most widely read). */
  alphaBitDepth?: 8 | 16;
  /** Timestamp for the `date` attribute and the ZIP entries (default now). */
  date?: Date;
  /** The warp grid in the fill layout, traced from the rig; resampled from the mesh when absent. */
  warp?: FillLayoutGrid;
  /** The exact values at every projector pixel centre: the alpha map is then brightness·mask per pixel, not interpolated from the grid. */
  pixels?: PixelSamples;
}

export const MPCDI_DEFAULTS: Required<Omit<MpcdiOptions, 'date' | 'pixels' | 'warp'>> = { bufferId: 'skyfold', regionId: 'projector', alphaBitDepth: 8 };

export async function writeMpcdi(mesh: WarpMesh, options: MpcdiOptions = {}): Promise<Uint8Array> {
  const opts = { ...MPCDI_DEFAULTS, ...options };
  const date = options.date ?? new Date();
  const xRes = Math.round(mesh.width);
  const yRes = Math.round(mesh.height);
  if (xRes < 1 || yRes < 1) throw new Error(`Expected a projector resolution of at least 1×1 for MPCDI but received ${mesh.width}×${mesh.height}`);
  const warpPath = `warp-${safeName(opts.regionId)}.pfm`;
  const alphaPath = `alpha-${safeName(opts.regionId)}.png`;

  const grid = options.warp ?? fillLayoutFromMesh(mesh);
  if (grid.cols !== mesh.cols || grid.rows !== mesh.rows) throw new Error(`Expected a ${mesh.cols}×${mesh.rows} warp grid but received ${grid.cols}×${grid.rows}`);
  // MPCDI 2.0 (VESA) §3.6.1: first row of the warp file = top of the region, unlike netpbm.
  const warpPfm = encodePfm({ width: grid.cols, height: grid.rows, channels: 3, data: grid.data }, { rowOrder: 'top-down' });
  const alphaPng = options.pixels ? await encodeExactAlphaMap(options.pixels, xRes, yRes, opts.alphaBitDepth) : await encodeAlphaMap(mesh, xRes, yRes, opts.alphaBitDepth);

  const stamp = date.toISOString().slice(0, 19).replace('T', ' ');
  const xml = [
    '<?xml version="1.0" encoding="utf-8"?>',
    `<MPCDI profile="2d" geometry="1" version="2.0" date="${stamp}">`,
    '  <!-- written by skyfold: warp = fisheye (dome master) u, v per sample, fill layout (sample i of N at (i + 0.5)/N), top row first, NaN = no data; alpha = brightness*mask, linear light -->',
    '  <display>',
    `    <buffer id="${xmlEscape(opts.bufferId)}" xResolution="${xRes}" yResolution="${yRes}">`,
    `      <region id="${xmlEscape(opts.regionId)}" xResolution="${xRes}" yResolution="${yRes}" x="0" y="0" xsize="1" ysize="1"/>`,
    '    </buffer>',
    '  </display>',
    '  <files>',
    `    <fileset region="${xmlEscape(opts.regionId)}">`,
    '      <geometryWarpFile>',
    `        <path>${warpPath}</path>`,
    '        <interpolation>linear</interpolation>',
    '      </geometryWarpFile>',
    '      <alphaMap>',
    `        <path>${alphaPath}</path>`,
    '        <componentDepth>1</componentDepth>',
    `        <bitDepth>${opts.alphaBitDepth}</bitDepth>`,
    '        <gammaEmbedded>1.0</gammaEmbedded>',
    '      </alphaMap>',
    '    </fileset>',
    '  </files>',
    '</MPCDI>',
    '',
  ].join('\n');

  const mtime = date;
  return zipSync(
    {
      'mpcdi.xml': [strToU8(xml), { mtime }],
      [warpPath]: [warpPfm, { mtime }],
      [alphaPath]: [alphaPng, { mtime, level: 0 }],
    },
    { level: 6 },
  );
}

/**
 * The alpha map at the region's resolution: brightness·mask interpolated bilinearly from the grid at
 * each pixel centre (x + 0.5, y + 0.5), first PNG row = top of the projector frame.
 */
async function encodeAlphaMap(mesh: WarpMesh, width: number, height: number, bitDepth: 8 | 16): Promise<Uint8Array> {
  const { cols, rows } = mesh;
  const max = bitDepth === 16 ? 65535 : 255;
  const out = bitDepth === 16 ? new Uint16Array(width * height) : new Uint8Array(width * height);
  const sx = (cols - 1) / width;
  const sy = (rows - 1) / height;
  const k = (i: number): number => mesh.brightness[i] * mesh.mask[i];
  for (let y = 0; y < height; y++) {
    const gy = Math.min(rows - 1, (y + 0.5) * sy);
    const r0 = Math.min(rows - 2, Math.floor(gy));
    const fy = gy - r0;
    for (let x = 0; x < width; x++) {
      const gx = Math.min(cols - 1, (x + 0.5) * sx);
      const c0 = Math.min(cols - 2, Math.floor(gx));
      const fx = gx - c0;
      const i = r0 * cols + c0;
      const top = k(i) * (1 - fx) + k(i + 1) * fx;
      const bottom = k(i + cols) * (1 - fx) + k(i + cols + 1) * fx;
      const a = top * (1 - fy) + bottom * fy;
      out[y * width + x] = Math.round(Math.min(1, Math.max(0, a)) * max);
    }
  }
  return encodePng({ width, height, channels: 1, data: out }, 9);
}

/** The alpha map from the exact per-pixel values: brightness·mask at each pixel centre. */
async function encodeExactAlphaMap(f: PixelSamples, width: number, height: number, bitDepth: 8 | 16): Promise<Uint8Array> {
  if (f.width !== width || f.height !== height) throw new Error(`Expected per-pixel values of ${width}×${height} but received ${f.width}×${f.height}`);
  const max = bitDepth === 16 ? 65535 : 255;
  const out = bitDepth === 16 ? new Uint16Array(width * height) : new Uint8Array(width * height);
  for (let k = 0; k < width * height; k++) out[k] = Math.round(Math.min(1, Math.max(0, f.brightness[k] * f.mask[k])) * max);
  return encodePng({ width, height, channels: 1, data: out }, 9);
}

export interface MpcdiContents {
  /**
   * The warp as a corner-to-corner mesh of (N + 1) × (M + 1) vertices at the samples' corners: u, v
   * interpolated bilinearly between the four samples around each corner (extrapolated linearly at the
   * border; the nearest sample with data where some have none); brightness = alpha at the pixel
   * nearest the corner; mask = 1 where that alpha > 0.
   */
  mesh: WarpMesh;
  /** The warp grid as stored, in the fill layout. */
  warp: FillLayoutGrid;
  xml: string;
  profile: string;
  warpPath: string;
  alphaPath: string;
  /** Alpha map samples scaled to [0, 1], the top row first. */
  alpha: { width: number; height: number; data: Float32Array };
}

/** Unzips an MPCDI package written by {@link writeMpcdi} and reads back its warp and alpha map. */
export async function readMpcdi(bytes: Uint8Array): Promise<MpcdiContents> {
  let entries: Record<string, Uint8Array>;
  let inflated = 0;
  try {
    // the sizes the ZIP declares bound what is inflated (fflate writes no more than the declared size)
    entries = unzipSync(bytes, {
      filter: (f) => {
        inflated += f.originalSize;
        if (f.originalSize > MAX_MPCDI_ENTRY || inflated > MAX_MPCDI_INFLATED) {
          throw new Error(`the entry ${shortName(f.name)} inflates to ${(f.originalSize / 2 ** 20).toFixed(0)} MB, beyond the ${MAX_MPCDI_ENTRY / 2 ** 20} MB a warp or alpha map of an 8K projector needs (${MAX_MPCDI_INFLATED / 2 ** 20} MB in all)`);
        }
        return true;
      },
    });
  } catch (err) {
    throw new Error(`Expected an MPCDI package (a ZIP) but could not unzip it: ${(err as Error).message}`);
  }
  const xmlBytes = entries['mpcdi.xml'];
  if (!xmlBytes) throw new Error('Expected mpcdi.xml in the MPCDI package but found none');
  const xml = strFromU8(xmlBytes);
  const facts = scanMpcdiXml(xml);
  const profile = facts.root?.profile;
  if (profile !== '2d') throw new Error(`Expected MPCDI profile "2d" but received ${profile === undefined ? 'none' : `"${shortName(profile)}"`}`);
  const xRes = Number(facts.region?.xResolution);
  const yRes = Number(facts.region?.yResolution);
  const { warpPath, alphaPath } = facts;
  if (!warpPath || !entries[warpPath]) throw new Error(`Expected the geometry warp file ${shortName(warpPath ?? '(no path)')} in the MPCDI package`);
  if (!alphaPath || !entries[alphaPath]) throw new Error(`Expected the alpha map ${shortName(alphaPath ?? '(no path)')} in the MPCDI package`);
  if (!(xRes > 0) || !(yRes > 0)) throw new Error('Expected region xResolution and yResolution in mpcdi.xml');
  checkMeshSize(2, 2, xRes, yRes);
  if (!Number.isInteger(xRes) || !Number.isInteger(yRes)) throw new Error(`Expected whole-pixel region xResolution and yResolution but received ${shortName(String(facts.region?.xResolution))}, ${shortName(String(facts.region?.yResolution))}`);

  const pfm = decodePfm(entries[warpPath], { rowOrder: 'top-down' });
  if (pfm.channels !== 3) throw new Error('Expected a 3-channel geometry warp PFM');
  checkMeshSize(pfm.width, pfm.height, xRes, yRes);
  const wide = (await sharp(entries[alphaPath]).metadata()).depth === 'ushort';
  // 16-bit needs an explicit 16-bit colourspace, or sharp returns 8-bit sRGB values widened to ushort.
  const alphaImage = wide ? sharp(entries[alphaPath]).toColorspace('grey16').raw({ depth: 'ushort' }) : sharp(entries[alphaPath]).toColorspace('b-w').raw();
  const { data: raw, info } = await alphaImage.toBuffer({ resolveWithObject: true });
  if (info.channels !== 1) throw new Error(`Expected a 1-channel alpha map but received ${info.channels} channels`);
  const copy = raw.buffer.slice(raw.byteOffset, raw.byteOffset + raw.byteLength);
  const samples = wide ? new Uint16Array(copy) : new Uint8Array(copy);
  const scale = wide ? 65535 : 255;
  const alpha = { width: info.width, height: info.height, data: Float32Array.from(samples, (s) => s / scale) };

  const warp: FillLayoutGrid = { cols: pfm.width, rows: pfm.height, data: pfm.data };
  const mesh = checkMeshValues(cornerMesh(warp, xRes, yRes, alpha));
  return { mesh, warp, xml, profile, warpPath, alphaPath, alpha };
}

/** The corner-to-corner mesh a fill-layout warp implies (see {@link MpcdiContents.mesh}). */
function cornerMesh(warp: FillLayoutGrid, xRes: number, yRes: number, alpha: { width: number; height: number; data: Float32Array }): WarpMesh {
  const { cols: N, rows: M, data } = warp;
  if (N < 2 || M < 2) throw new Error(`Expected a warp grid of at least 2×2 but received ${N}×${M}`);
  const cols = N + 1;
  const rows = M + 1;
  const mesh: WarpMesh = { cols, rows, width: xRes, height: yRes, u: new Float32Array(cols * rows), v: new Float32Array(cols * rows), brightness: new Float32Array(cols * rows), mask: new Float32Array(cols * rows), meta: {} };
  const at = (i: number, j: number, ch: number) => data[3 * (j * N + i) + ch];
  for (let r = 0; r < rows; r++) {
    // corner r lies at texel coordinate r − 0.5 (sample j at j); fy outside [0, 1] extrapolates at the border
    const j0 = Math.min(M - 2, Math.max(0, r - 1));
    const fy = r - 0.5 - j0;
    for (let c = 0; c < cols; c++) {
      const i0 = Math.min(N - 2, Math.max(0, c - 1));
      const fx = c - 0.5 - i0;
      const k = r * cols + c;
      for (let ch = 0; ch < 2; ch++) {
        let x = (1 - fy) * ((1 - fx) * at(i0, j0, ch) + fx * at(i0 + 1, j0, ch)) + fy * ((1 - fx) * at(i0, j0 + 1, ch) + fx * at(i0 + 1, j0 + 1, ch));
        if (Number.isNaN(x)) {
          // the first of the (up to four) samples touching the corner that has data, else the frame's centre
          for (const [ii, jj] of [[c - 1, r - 1], [c, r - 1], [c - 1, r], [c, r]]) {
            const v = at(Math.min(N - 1, Math.max(0, ii)), Math.min(M - 1, Math.max(0, jj)), ch);
            if (!Number.isNaN(v)) {
              x = v;
              break;
            }
          }
          if (Number.isNaN(x)) x = 0.5;
        }
        (ch === 0 ? mesh.u : mesh.v)[k] = x;
      }
      const px = Math.min(alpha.width - 1, Math.floor((c / N) * alpha.width));
      const py = Math.min(alpha.height - 1, Math.floor((r / M) * alpha.height));
      const a = alpha.data[py * alpha.width + px];
      mesh.brightness[k] = a;
      mesh.mask[k] = a > 0 ? 1 : 0;
    }
  }
  return mesh;
}

/** Largest inflated entry and package: an 8K projector's 16-bit alpha map is 128 MB raw, but PNG; a 1025-column warp PFM is 8 MB. */
const MAX_MPCDI_ENTRY = 64 * 2 ** 20;
const MAX_MPCDI_INFLATED = 128 * 2 ** 20;

function shortName(s: string): string {
  return JSON.stringify(s.length > 40 ? s.slice(0, 39) + '…' : s);
}

interface MpcdiFacts {
  root?: Record<string, string>;
  region?: Record<string, string>;
  warpPath?: string;
  alphaPath?: string;
}

/**
 * The few things the reader needs from mpcdi.xml, in one pass over the text (each tag is found by
 * indexOf from where the last one ended, so the work is linear however many tags there are): the root's
 * attributes, the first region's, and the first <path> inside <geometryWarpFile> and <alphaMap>.
 */
function scanMpcdiXml(xml: string): MpcdiFacts {
  const facts: MpcdiFacts = {};
  const stack: string[] = [];
  let text = '';
  let i = 0;
  for (;;) {
    const lt = xml.indexOf('<', i);
    if (lt < 0) break;
    if (stack[stack.length - 1] === 'path') text += xml.slice(i, lt);
    const skipTo = (close: string) => {
      const e = xml.indexOf(close, lt);
      if (e < 0) throw new Error('Expected well-formed mpcdi.xml but a comment or declaration never ends');
      return e + close.length;
    };
    if (xml.startsWith('<!--', lt)) i = skipTo('-->');
    else if (xml.startsWith('<?', lt)) i = skipTo('?>');
    else if (xml.startsWith('<!', lt)) i = skipTo('>');
    else {
      const gt = xml.indexOf('>', lt);
      if (gt < 0) throw new Error('Expected well-formed mpcdi.xml but a tag never ends');
      // a tag is a name and a few attributes; a longer one is no MPCDI (and keeps the attribute scan linear)
      if (gt - lt > 4096) throw new Error('Expected mpcdi.xml tags of a few attributes but found one over 4096 characters');
      const body = xml.slice(lt + 1, gt);
      i = gt + 1;
      if (body.startsWith('/')) {
        const name = body.slice(1).trim();
        if (stack[stack.length - 1] !== name) throw new Error(`Expected well-formed mpcdi.xml but </${shortName(name).slice(1, -1)}> closes nothing open`);
        stack.pop();
        if (name === 'path') {
          const parent = stack[stack.length - 1];
          if (parent === 'geometryWarpFile' && facts.warpPath === undefined) facts.warpPath = text.trim();
          if (parent === 'alphaMap' && facts.alphaPath === undefined) facts.alphaPath = text.trim();
          text = '';
        }
        continue;
      }
      const name = /^[^\s/>]+/.exec(body)?.[0] ?? '';
      const attrs: Record<string, string> = {};
      for (const m of body.matchAll(/([A-Za-z_:][\w:.-]*)\s*=\s*(?:"([^"]*)"|'([^']*)')/g)) attrs[m[1]] = m[2] ?? m[3];
      if (name === 'MPCDI' && facts.root === undefined) facts.root = attrs;
      if (name === 'region' && facts.region === undefined) facts.region = attrs;
      if (!body.endsWith('/')) {
        stack.push(name);
        if (stack.length > 64) throw new Error('Expected mpcdi.xml nested at most 64 deep');
        if (name === 'path') text = '';
      }
    }
  }
  return facts;
}

function xmlEscape(s: string): string {
  return s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');
}

function safeName(s: string): string {
  return s.replace(/[^A-Za-z0-9._-]/g, '_');
}
