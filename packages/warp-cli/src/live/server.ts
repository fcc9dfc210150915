/**
 * The `skyfold live` server: node:http on loopback, serving the page, the rig as loaded, the dome's
 * triangles and the media given, and taking back rigs to save and meshes to bake. Every request is
 * checked by security.ts first; every answer that is not a file is JSON, errors as `{ error }`.
 */
import { createServer, type IncomingMessage, type Server, type ServerResponse } from 'node:http';
import { createReadStream, fstatSync, openSync, closeSync } from 'node:fs';
import { basename, dirname, resolve } from 'node:path';
import type { Socket } from 'node:net';
import type { Rig } from '@skyfold/warp-core';
import { UserError } from '../errors.js';
import { loadRig, type LoadedRig } from '../io/document-file.js';
import { rigDocumentText } from '../io/rig-edit.js';
import { livePageAssets } from './assets.js';
import { collectMedia, contentType, type MediaItem } from './media.js';
import { LiveRequestError, liveActions, type LiveActions } from './actions.js';
import { allowedHosts, hostForUrl, isLoopback, isWildcard, newToken, refusal } from './security.js';

export interface LiveServerOptions {
  /** The rig file (or a .glb baked by skyfold), relative to `cwd`. */
  rig: string;
  /** Dome-master images, videos and folders of images to preview, relative to `cwd`. */
  media?: readonly string[];
  /** 0 (the default): any free port. */
  port?: number;
  /** The address to listen on; loopback (127.0.0.1) unless given. */
  host?: string;
  /** The folder relative paths are read against (default: the process's). */
  cwd?: string;
  /** The rig as already loaded from `rig` (the command loads it to print its warnings). */
  loaded?: LoadedRig;
}

export interface LiveServer {
  url: string;
  port: number;
  token: string;
  /** Stops listening, ends open connections, resolves when the server is closed. */
  close(): Promise<void>;
}

/** Request bodies are rigs and lists of formats, a few kilobytes; a mebibyte is far more than any needs. */
export const MAX_BODY_BYTES = 2 ** 20;

/** The page: its scripts and everything it fetches come from this server only; the token never leaves in a Referer. */
const PAGE_HEADERS = {
  'Content-Security-Policy': "default-src 'self'; img-src 'self' blob: data:; media-src 'self' blob:; style-src 'self' 'unsafe-inline'; connect-src 'self'; frame-ancestors 'none'; base-uri 'none'; form-action 'none'",
};
const COMMON_HEADERS = {
  'Cache-Control': 'no-store',
  'X-Content-Type-Options': 'nosniff',
  'Referrer-Policy': 'no-referrer',
  'Cross-Origin-Resource-Policy': 'same-origin',
};

function send(res: ServerResponse, status: number, body: string | Uint8Array, type: string, extra: Record<string, string> = {}): void {
  res.writeHead(status, { ...COMMON_HEADERS, 'Content-Type': type, 'Content-Length': String(Buffer.byteLength(body)), ...extra });
  res.end(body);
}

function sendJson(res: ServerResponse, status: number, value: unknown): void {
  send(res, status, JSON.stringify(value), 'application/json; charset=utf-8');
}

function sendError(res: ServerResponse, status: number, message: string, extra: Record<string, string> = {}): void {
  if (res.headersSent) {
    res.destroy();
    return;
  }
  res.writeHead(status, { ...COMMON_HEADERS, 'Content-Type': 'application/json; charset=utf-8', ...extra });
  res.end(JSON.stringify({ error: message }));
}

/** The rig as the page gets it: the resolved model (metres, radians), the as-built dome's triangles left out. */
export function rigForPage(rig: Rig): unknown {
  return { ...rig, dome: { ...rig.dome, mesh: null } };
}

/** The as-built dome as little-endian Float32, nine per triangle (three corners, world frame, metres). */
export function domeMeshBytes(rig: Rig): Uint8Array | null {
  const mesh = rig.dome.mesh;
  if (!mesh) return null;
  const out = new Float32Array(mesh.triangleCount * 9);
  for (let t = 0; t < mesh.triangleCount; t++) {
    for (let c = 0; c < 3; c++) {
      const v = mesh.indices[t * 3 + c] * 3;
      out[t * 9 + c * 3] = mesh.positions[v];
      out[t * 9 + c * 3 + 1] = mesh.positions[v + 1];
      out[t * 9 + c * 3 + 2] = mesh.positions[v + 2];
    }
  }
  // Float32Array is in the platform's byte order; every platform Node runs on is little-endian, checked here
  if (new Uint8Array(new Uint16Array([1]).buffer)[0] !== 1) throw new Error('big-endian platform: the dome mesh bytes would be in the wrong order');
  return new Uint8Array(out.buffer);
}

/**
 * One HTTP byte range (RFC 9110, 14.1.2: "bytes=first-last", "bytes=first-", "bytes=-suffix"), clipped
 * to the file; null: serve the whole file (no header, or several ranges, which a browser's video
 * element never asks for); 'unsatisfiable': a 416.
 */
export function parseRange(header: string | undefined, size: number): { start: number; end: number } | null | 'unsatisfiable' {
  if (!header) return null;
  const m = /^bytes=(\d*)-(\d*)$/.exec(header.trim());
  if (!m || (m[1] === '' && m[2] === '')) return null;
  if (m[1] === '') {
    const suffix = Number(m[2]);
    if (suffix === 0 || size === 0) return 'unsatisfiable';
    return { start: Math.max(0, size - suffix), end: size - 1 };
  }
  const start = Number(m[1]);
  const end = m[2] === '' ? size - 1 : Math.min(Number(m[2]), size - 1);
  if (start >= size || end < start) return 'unsatisfiable';
  return { start, end };
}

/** Sends one file of the media list, with Range support; the file is opened once and checked to be a regular file. */
function sendFile(req: IncomingMessage, res: ServerResponse, path: string): void {
  let fd: number;
  try {
    fd = openSync(path, 'r');
  } catch {
    sendError(res, 404, `${basename(path)}: cannot be read any more`);
    return;
  }
  const st = fstatSync(fd);
  if (!st.isFile()) {
    closeSync(fd);
    sendError(res, 404, `${basename(path)}: not a regular file any more`);
    return;
  }
  const range = parseRange(req.headers.range, st.size);
  const headers = { ...COMMON_HEADERS, 'Content-Type': contentType(path), 'Accept-Ranges': 'bytes' };
  if (range === 'unsatisfiable') {
    closeSync(fd);
    sendError(res, 416, `range not satisfiable (the file has ${st.size} bytes)`, { 'Content-Range': `bytes */${st.size}` });
    return;
  }
  if (req.method === 'HEAD' || st.size === 0) {
    closeSync(fd);
    res.writeHead(200, { ...headers, 'Content-Length': String(st.size) });
    res.end();
    return;
  }
  const { start, end } = range ?? { start: 0, end: st.size - 1 };
  res.writeHead(range ? 206 : 200, { ...headers, 'Content-Length': String(end - start + 1), ...(range ? { 'Content-Range': `bytes ${start}-${end}/${st.size}` } : {}) });
  const stream = createReadStream('', { fd, start, end, autoClose: true });
  stream.on('error', () => res.destroy());
  res.on('close', () => stream.destroy());
  stream.pipe(res);
}

/** Reads a JSON request body of at most MAX_BODY_BYTES (413 beyond), Content-Type application/json (415 otherwise). */
function readJsonBody(req: IncomingMessage): Promise<unknown> {
  return new Promise((resolveBody, reject) => {
    const type = (req.headers['content-type'] ?? '').split(';')[0].trim().toLowerCase();
    if (type !== 'application/json') {
      reject(new LiveRequestError(415, `expected a JSON body (Content-Type: application/json), got ${type ? `"${type.slice(0, 60)}"` : 'none'}`));
      req.resume();
      return;
    }
    const declared = Number(req.headers['content-length'] ?? 0);
    const tooLarge = new LiveRequestError(413, `the request body is larger than ${MAX_BODY_BYTES / 2 ** 20} MiB`);
    if (declared > MAX_BODY_BYTES) {
      reject(tooLarge);
      req.resume();
      return;
    }
    const chunks: Buffer[] = [];
    let size = 0;
    let failed = false;
    req.on('data', (chunk: Buffer) => {
      if (failed) return;
      size += chunk.length;
      if (size > MAX_BODY_BYTES) {
        failed = true;
        chunks.length = 0;
        reject(tooLarge);
        return;
      }
      chunks.push(chunk);
    });
    req.on('error', (e) => reject(e));
    req.on('end', () => {
      if (failed) return;
      try {
        resolveBody(JSON.parse(Buffer.concat(chunks).toString('utf8')));
      } catch {
        reject(new LiveRequestError(400, 'the request body is not valid JSON'));
      }
    });
  });
}

interface ServerState {
  loaded: LoadedRig;
  rigPath: string;
  rigText: string;
  media: MediaItem[];
  token: string;
  domeMesh: Uint8Array | null;
  actions?: LiveActions;
}

function session(s: ServerState): unknown {
  const t = `?t=${s.token}`;
  const rig = s.loaded.rig;
  return {
    rigFile: basename(s.rigPath),
    units: rig.units,
    rig: rigForPage(rig),
    domeMesh: rig.dome.mesh ? { url: `/api/dome-mesh${t}`, triangles: rig.dome.mesh.triangleCount } : null,
    rigText: s.rigText,
    media: s.media.map((m) => ({
      id: m.id,
      name: m.name,
      kind: m.kind,
      url: `/media/${m.id}${t}`,
      ...(m.kind === 'sequence' ? { frames: m.files.map((_, n) => `/media/${m.id}/${n}${t}`), fps: SEQUENCE_FPS } : {}),
    })),
  };
}

/** The rate a folder of frames starts playing at: 30 frames per second, the usual rate of fulldome shows (from memory). */
export const SEQUENCE_FPS = 30;

async function handle(s: ServerState, hosts: ReadonlySet<string>, req: IncomingMessage, res: ServerResponse): Promise<void> {
  const raw = req.url ?? '/';
  let url: URL;
  try {
    url = new URL(raw, 'http://live.invalid');
  } catch {
    sendError(res, 400, 'malformed request address');
    return;
  }
  const why = refusal(req, url, s.token, hosts);
  if (why) {
    sendError(res, 403, why);
    return;
  }
  // the URL parser folds "..", "%2e%2e" and "\" away; a request that needed folding names no route of ours
  const path = raw.split('?')[0];
  if (/(^|\/|\\)(\.|%2e){2}(\/|\\|$)|\\|%2f|%5c|%00/i.test(path) || path !== url.pathname) {
    sendError(res, 404, 'no such page');
    return;
  }
  const method = req.method ?? 'GET';
  const get = method === 'GET' || method === 'HEAD';
  const only = (allowed: string) => {
    sendError(res, 405, `${url.pathname} takes ${allowed} only`, { Allow: allowed });
  };
  if (url.pathname === '/' || url.pathname === '/app.js') {
    if (!get) return only('GET');
    const assets = await livePageAssets(s.token);
    if (url.pathname === '/') send(res, 200, assets.html, 'text/html; charset=utf-8', PAGE_HEADERS);
    else send(res, 200, assets.js, 'text/javascript; charset=utf-8');
    return;
  }
  if (url.pathname === '/api/session') {
    if (!get) return only('GET');
    sendJson(res, 200, session(s));
    return;
  }
  if (url.pathname === '/api/dome-mesh') {
    if (!get) return only('GET');
    if (!s.domeMesh) return sendError(res, 404, `${basename(s.rigPath)} has no as-built dome (dome.mesh)`);
    send(res, 200, s.domeMesh, 'application/octet-stream');
    return;
  }
  const media = /^\/media\/(\d{1,6})(?:\/(\d{1,9}))?$/.exec(url.pathname);
  if (media) {
    if (!get) return only('GET');
    const item = s.media[Number(media[1])];
    if (!item) return sendError(res, 404, `no media ${media[1]}`);
    if (media[2] === undefined && item.kind === 'sequence') return sendError(res, 404, `media ${item.id} is a sequence: ask for /media/${item.id}/<frame>`);
    if (media[2] !== undefined && item.kind !== 'sequence') return sendError(res, 404, `media ${item.id} is one file, not a sequence`);
    const file = item.files[media[2] === undefined ? 0 : Number(media[2])];
    if (file === undefined) return sendError(res, 404, `media ${item.id} has ${item.files.length} frames (0 to ${item.files.length - 1})`);
    sendFile(req, res, file);
    return;
  }
  const action = s.actions && /^\/api\/(save|bake)$/.exec(url.pathname);
  if (action && s.actions) {
    if (method !== 'POST') return only('POST');
    const body = await readJsonBody(req);
    const answer = action[1] === 'save' ? await s.actions.save(body) : await s.actions.bake(body);
    sendJson(res, 200, answer);
    return;
  }
  sendError(res, 404, 'no such page');
}

/** Starts the server; resolves once it listens. */
export async function startLiveServer(options: LiveServerOptions): Promise<LiveServer> {
  const cwd = options.cwd ?? process.cwd();
  const rigPath = resolve(cwd, options.rig);
  const loaded = options.loaded ?? loadRig(rigPath);
  const state: ServerState = {
    loaded,
    rigPath,
    rigText: rigDocumentText(rigPath, loaded.rig),
    media: collectMedia(options.media ?? [], cwd),
    token: newToken(),
    domeMesh: domeMeshBytes(loaded.rig),
  };
  state.actions = liveActions({ loaded, rigPath, rigText: state.rigText, folder: dirname(rigPath) });
  const bind = options.host ?? '127.0.0.1';
  let hosts: ReadonlySet<string> = new Set();
  const sockets = new Set<Socket>();
  const server: Server = createServer((req, res) => {
    handle(state, hosts, req, res).catch((e: unknown) => {
      // after a 413 the rest of the body is not worth reading: the connection closes once the answer is sent
      if (e instanceof LiveRequestError) sendError(res, e.status, e.message, e.status === 413 ? { Connection: 'close' } : {});
      else if (e instanceof UserError) sendError(res, 400, e.message);
      // a defect: one line, never the stack
      else sendError(res, 500, `internal error: ${(e as Error)?.message ?? String(e)}`);
    });
  });
  // bounded: headers (16 KiB is Node's own default), time to send them, idle keep-alive
  server.maxHeadersCount = 100;
  server.headersTimeout = 20_000;
  server.requestTimeout = 120_000;
  server.on('connection', (socket: Socket) => {
    sockets.add(socket);
    socket.on('close', () => sockets.delete(socket));
  });
  await new Promise<void>((ok, fail) => {
    const onError = (e: NodeJS.ErrnoException) => {
      fail(
        e.code === 'EADDRINUSE'
          ? new UserError(`--port ${options.port}: already in use (give another, or 0 for any free port)`)
          : e.code === 'EADDRNOTAVAIL' || e.code === 'ENOTFOUND'
            ? new UserError(`--host ${bind}: not an address of this machine`)
            : e.code === 'EACCES'
              ? new UserError(`--port ${options.port}: not allowed (ports below 1024 need privileges)`)
              : e,
      );
    };
    server.once('error', onError);
    server.listen(options.port ?? 0, bind, () => {
      server.off('error', onError);
      ok();
    });
  });
  const address = server.address();
  const port = typeof address === 'object' && address ? address.port : (options.port ?? 0);
  hosts = allowedHosts(bind, port);
  const urlHost = isLoopback(bind) || isWildcard(bind) ? '127.0.0.1' : hostForUrl(bind);
  let closing: Promise<void> | undefined;
  return {
    url: `http://${urlHost}:${port}/?t=${state.token}`,
    port,
    token: state.token,
    close() {
      closing ??= new Promise<void>((ok) => {
        server.close(() => ok());
        for (const s of sockets) s.destroy();
      });
      return closing;
    },
  };
}
