/** `skyfold live`'s server: who it answers (token, Host, Origin), what it serves, and how it stops. */
import { mkdirSync, readFileSync, symlinkSync, writeFileSync } from 'node:fs';
import { request } from 'node:http';
import { connect } from 'node:net';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startLiveServer, type LiveServer } from '@skyfold/warp-cli';
import { DEMO_RIG, FIXTURES, tempDir } from './support.js';

interface Answer {
  status: number;
  headers: Record<string, string | string[] | undefined>;
  body: Buffer;
  json(): any;
}

/** One request on its own connection (no keep-alive agent left behind), any headers, the Host header included. */
function ask(port: number, path: string, options: { method?: string; headers?: Record<string, string>; body?: string | Buffer } = {}): Promise<Answer> {
  return new Promise((ok, fail) => {
    const req = request({ host: '127.0.0.1', port, path, method: options.method ?? 'GET', headers: { host: `127.0.0.1:${port}`, ...options.headers }, agent: false }, (res) => {
      const chunks: Buffer[] = [];
      res.on('data', (c: Buffer) => chunks.push(c));
      res.on('end', () => {
        const body = Buffer.concat(chunks);
        ok({ status: res.statusCode ?? 0, headers: res.headers, body, json: () => JSON.parse(body.toString('utf8')) });
      });
      res.on('error', fail);
    });
    req.on('error', fail);
    req.end(options.body);
  });
}

const dir = tempDir('live-server');
const show = join(dir, 'show');
const secret = join(dir, 'secret');
let server: LiveServer;
let t: string;
const video = Buffer.from(Array.from({ length: 5000 }, (_, i) => (i * 7) % 256));

beforeAll(async () => {
  mkdirSync(show);
  mkdirSync(secret);
  writeFileSync(join(secret, 'notes.png'), 'not for the page');
  // frames out of natural order on disk, a hidden one, and a link leading out of the folder
  for (const n of ['frame10.png', 'frame2.png', 'frame1.png', '.hidden.png']) writeFileSync(join(show, n), n);
  symlinkSync(join(secret, 'notes.png'), join(show, 'frame3.png'));
  writeFileSync(join(dir, 'clip.mp4'), video);
  writeFileSync(join(dir, 'still.jpg'), 'jpeg bytes');
  server = await startLiveServer({ rig: DEMO_RIG, media: ['show', 'clip.mp4', 'still.jpg'], cwd: dir });
  t = server.token;
});
afterAll(() => server.close());

describe('skyfold live: the server', () => {
  it('prints a loopback URL with a 32-hex-digit token', () => {
    expect(t).toMatch(/^[0-9a-f]{32}$/);
    expect(server.url).toBe(`http://127.0.0.1:${server.port}/?t=${t}`);
  });

  it('serves the page and its script with the token', async () => {
    const page = await ask(server.port, `/?t=${t}`);
    expect(page.status).toBe(200);
    expect(page.headers['content-type']).toBe('text/html; charset=utf-8');
    expect(page.headers['content-security-policy']).toContain("default-src 'self'");
    expect(page.headers['referrer-policy']).toBe('no-referrer');
    const js = await ask(server.port, `/app.js?t=${t}`);
    expect(js.status).toBe(200);
    expect(js.headers['content-type']).toBe('text/javascript; charset=utf-8');
  });

  it('refuses every request without the token, or with a wrong one, the page included', async () => {
    for (const path of ['/', '/app.js', '/api/session', '/media/1', `/?t=${t.slice(0, 31)}`, `/?t=${t}0`, `/?t=${'0'.repeat(32)}`, `/?t=${t.toUpperCase()}`, `/?t=${t}&t=${t}`]) {
      const a = await ask(server.port, path);
      expect(a.status, path).toBe(403);
      expect(a.json().error).toMatch(/token/);
    }
  });

  it('refuses a foreign Host header (DNS rebinding) and answers to localhost', async () => {
    for (const host of ['evil.example:' + server.port, `127.0.0.1:${server.port + 1}`, '127.0.0.1', `localhost.evil.example:${server.port}`]) {
      const a = await ask(server.port, `/api/session?t=${t}`, { headers: { host } });
      expect(a.status, host).toBe(403);
      expect(a.json().error).toMatch(/Host/);
    }
    expect((await ask(server.port, `/api/session?t=${t}`, { headers: { host: `localhost:${server.port}` } })).status).toBe(200);
    // HTTP/1.0 without a Host header at all (node:http always sends one, so by hand)
    const raw = await new Promise<string>((ok, fail) => {
      const socket = connect(server.port, '127.0.0.1', () => socket.end(`GET /api/session?t=${t} HTTP/1.0\r\n\r\n`));
      let text = '';
      socket.on('data', (c) => (text += c.toString()));
      socket.on('end', () => ok(text));
      socket.on('error', fail);
    });
    expect(raw).toMatch(/^HTTP\/1\.[01] 403/);
  });

  it('refuses a foreign Origin, and a cross-site fetch, even with the token', async () => {
    for (const origin of ['http://evil.example', `http://127.0.0.1:${server.port + 1}`, `https://127.0.0.1:${server.port}`, 'null']) {
      const a = await ask(server.port, `/api/session?t=${t}`, { headers: { origin } });
      expect(a.status, origin).toBe(403);
      expect(a.json().error).toMatch(/Origin/);
    }
    expect((await ask(server.port, `/api/session?t=${t}`, { headers: { origin: `http://127.0.0.1:${server.port}` } })).status).toBe(200);
    expect((await ask(server.port, `/api/session?t=${t}`, { headers: { 'sec-fetch-site': 'cross-site' } })).status).toBe(403);
  });

  it('serves no path outside its list: plain and encoded ../, absolute paths, backslashes', async () => {
    for (const path of [
      `/media/../fixtures/demo-rig.yaml?t=${t}`,
      `/media/%2e%2e/%2e%2e/etc/passwd?t=${t}`,
      `/media/0/..%2f..%2fsecret%2fnotes.png?t=${t}`,
      `/%2e%2e/secret/notes.png?t=${t}`,
      `/media/..\\secret\\notes.png?t=${t}`,
      `/secret/notes.png?t=${t}`,
      `//etc/passwd?t=${t}`,
      `/media/0/3?t=${t}`,
      `/media/9?t=${t}`,
      `/demo-rig.yaml?t=${t}`,
    ]) {
      const a = await ask(server.port, path);
      expect([403, 404], path).toContain(a.status);
      expect(a.body.toString()).not.toContain('not for the page');
      expect(a.json().error).toBeTypeOf('string');
    }
  });

  it('gives the session: rig file, units, the resolved rig without the dome mesh, the rig text and the media with URLs', async () => {
    const a = await ask(server.port, `/api/session?t=${t}`);
    expect(a.status).toBe(200);
    expect(a.headers['content-type']).toBe('application/json; charset=utf-8');
    const s = a.json();
    expect(s.rigFile).toBe('demo-rig.yaml');
    expect(s.units).toBe('m');
    expect(s.rigText).toBe(readFileSync(DEMO_RIG, 'utf8'));
    expect(s.domeMesh).toBeNull();
    // the demo rig's values in metres and radians (fixtures/demo-rig.yaml: diameter 5, mirror radius 0.3, capAngle 90)
    expect(s.rig.dome.radius).toBe(2.5);
    expect(s.rig.dome.mesh).toBeNull();
    expect(s.rig.mirror.radius).toBe(0.3);
    expect(s.rig.mirror.capAngle).toBeCloseTo(Math.PI / 2, 12);
    expect(s.rig.projector.resolution).toEqual([1920, 1200]);
    expect(Math.hypot(...s.rig.mirror.axis)).toBeCloseTo(1, 12);
    expect(s.media).toEqual([
      { id: 0, name: 'show', kind: 'sequence', url: `/media/0?t=${t}`, frames: [0, 1, 2].map((n) => `/media/0/${n}?t=${t}`), fps: 30 },
      { id: 1, name: 'clip.mp4', kind: 'video', url: `/media/1?t=${t}` },
      { id: 2, name: 'still.jpg', kind: 'image', url: `/media/2?t=${t}` },
    ]);
  });

  it('plays a folder in the order warp reads it, hidden files and links out of the folder left out', async () => {
    const frames = await Promise.all([0, 1, 2].map((n) => ask(server.port, `/media/0/${n}?t=${t}`)));
    expect(frames.map((f) => f.body.toString())).toEqual(['frame1.png', 'frame2.png', 'frame10.png']);
    expect(frames[0].headers['content-type']).toBe('image/png');
    const still = await ask(server.port, `/media/2?t=${t}`);
    expect(still.headers['content-type']).toBe('image/jpeg');
    expect(still.body.toString()).toBe('jpeg bytes');
  });

  it('answers byte ranges of a video with 206 (RFC 9110, 14)', async () => {
    const whole = await ask(server.port, `/media/1?t=${t}`);
    expect(whole.status).toBe(200);
    expect(whole.headers['accept-ranges']).toBe('bytes');
    expect(whole.headers['content-type']).toBe('video/mp4');
    expect(whole.body.equals(video)).toBe(true);
    const part = await ask(server.port, `/media/1?t=${t}`, { headers: { range: 'bytes=100-199' } });
    expect(part.status).toBe(206);
    expect(part.headers['content-range']).toBe('bytes 100-199/5000');
    expect(part.body.equals(video.subarray(100, 200))).toBe(true);
    const open = await ask(server.port, `/media/1?t=${t}`, { headers: { range: 'bytes=4990-' } });
    expect(open.headers['content-range']).toBe('bytes 4990-4999/5000');
    expect(open.body.equals(video.subarray(4990))).toBe(true);
    const suffix = await ask(server.port, `/media/1?t=${t}`, { headers: { range: 'bytes=-10' } });
    expect(suffix.body.equals(video.subarray(4990))).toBe(true);
    const beyond = await ask(server.port, `/media/1?t=${t}`, { headers: { range: 'bytes=5000-' } });
    expect(beyond.status).toBe(416);
    expect(beyond.headers['content-range']).toBe('bytes */5000');
  });

  it('answers errors as JSON without a stack: unknown pages, wrong methods', async () => {
    const none = await ask(server.port, `/api/nothing?t=${t}`);
    expect(none.status).toBe(404);
    expect(none.json()).toEqual({ error: 'no such page' });
    const post = await ask(server.port, `/api/session?t=${t}`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: '{}' });
    expect(post.status).toBe(405);
    expect(post.headers.allow).toBe('GET');
    expect(post.body.toString()).not.toMatch(/\bat .*\.js:\d+/);
  });
});

describe('skyfold live: a mesh-dome rig', () => {
  it('gives the triangle count and serves the triangles as little-endian Float32, nine per triangle, in metres', async () => {
    const rig = join(FIXTURES, 'school-dome-rig.yaml');
    const s = await startLiveServer({ rig });
    try {
      const session = (await ask(s.port, `/api/session?t=${s.token}`)).json();
      expect(session.units).toBe('ft');
      expect(session.rig.dome.mesh).toBeNull();
      // the 18 ft dome's radius in metres (1 ft = 0.3048 m exactly, NIST SP 811 B.8)
      expect(session.rig.dome.radius).toBeCloseTo(9 * 0.3048, 9);
      expect(session.domeMesh.url).toBe(`/api/dome-mesh?t=${s.token}`);
      expect(session.domeMesh.triangles).toBeGreaterThan(100);
      const mesh = await ask(s.port, session.domeMesh.url);
      expect(mesh.status).toBe(200);
      expect(mesh.headers['content-type']).toBe('application/octet-stream');
      expect(mesh.body.length).toBe(session.domeMesh.triangles * 9 * 4);
      const dv = new DataView(mesh.body.buffer, mesh.body.byteOffset, mesh.body.length);
      let far = 0;
      for (let i = 0; i < mesh.body.length; i += 12) far = Math.max(far, Math.hypot(dv.getFloat32(i, true), dv.getFloat32(i + 4, true), dv.getFloat32(i + 8, true)));
      // the hubs lie on the 9 ft sphere; the skirt reaches 2 ft below the springline, so nothing lies farther than sqrt(9² + 2²) ft
      expect(far).toBeGreaterThan(9 * 0.3048 * 0.999);
      expect(far).toBeLessThan(Math.hypot(9, 2) * 0.3048 * 1.001);
    } finally {
      await s.close();
    }
    // the demo rig has no mesh: its dome-mesh address is a 404 with a reason
    const demo = await startLiveServer({ rig: DEMO_RIG });
    try {
      const a = await ask(demo.port, `/api/dome-mesh?t=${demo.token}`);
      expect(a.status).toBe(404);
      expect(a.json().error).toMatch(/no as-built dome/);
    } finally {
      await demo.close();
    }
  });

  it('closes with a connection open, and frees its port', async () => {
    const s = await startLiveServer({ rig: DEMO_RIG });
    const hanging = request({ host: '127.0.0.1', port: s.port, path: `/api/session?t=${s.token}`, method: 'POST', headers: { host: `127.0.0.1:${s.port}`, 'content-type': 'application/json', 'content-length': '100' }, agent: false });
    hanging.on('error', () => {});
    hanging.write('{');
    await new Promise((r) => setTimeout(r, 50));
    await s.close();
    await s.close();
    const again = await startLiveServer({ rig: DEMO_RIG, port: s.port });
    expect(again.port).toBe(s.port);
    await again.close();
  });
});
