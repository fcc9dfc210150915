/** `skyfold live`'s POST requests: saving the nudged rig into the user's document, baking, and the bounds on bodies. */
import { readFileSync, writeFileSync } from 'node:fs';
import { request } from 'node:http';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { loadRig, startLiveServer, type LiveServer } from '@skyfold/warp-cli';
import { demoRigText, FIXTURES, skyfold, tempDir } from './support.js';

function post(s: LiveServer, path: string, body: string | Buffer, type = 'application/json'): Promise<{ status: number; json: any }> {
  return new Promise((ok, fail) => {
    const req = request(
      { host: '127.0.0.1', port: s.port, path: `${path}?t=${s.token}`, method: 'POST', headers: { host: `127.0.0.1:${s.port}`, 'content-type': type, origin: `http://127.0.0.1:${s.port}` }, agent: false },
      (res) => {
        let text = '';
        res.on('data', (c) => (text += c));
        res.on('end', () => ok({ status: res.statusCode ?? 0, json: JSON.parse(text) }));
      },
    );
    // the server may answer (413) before the whole body is sent
    req.on('error', fail);
    req.end(body);
  });
}

function session(s: LiveServer): Promise<any> {
  return new Promise((ok, fail) => {
    request({ host: '127.0.0.1', port: s.port, path: `/api/session?t=${s.token}`, agent: false }, (res) => {
      let text = '';
      res.on('data', (c) => (text += c));
      res.on('end', () => ok(JSON.parse(text)));
    })
      .on('error', fail)
      .end();
  });
}

const dir = tempDir('live-save');
const rigPath = join(dir, 'demo-rig.yaml');
let server: LiveServer;

beforeAll(async () => {
  writeFileSync(rigPath, demoRigText([160, 100]));
  server = await startLiveServer({ rig: rigPath });
});
afterAll(() => server.close());

describe('skyfold live: save', () => {
  it('writes the nudged rig beside the original, comments and layout kept, only the changed values changed', async () => {
    const { rig } = await session(server);
    rig.projector.throwRatio = 1.7;
    rig.mirror.center[2] += 0.01;
    const saved = await post(server, '/api/save', JSON.stringify({ rig }));
    expect(saved).toEqual({ status: 200, json: { file: 'demo-rig.live.yaml' } });
    const before = readFileSync(rigPath, 'utf8').split('\n');
    const after = readFileSync(join(dir, 'demo-rig.live.yaml'), 'utf8').split('\n');
    // every line but the two changed is as the user wrote it, in its place
    expect(after).toHaveLength(before.length);
    const changed = after.map((line, i) => (line === before[i] ? null : [before[i], line])).filter((x) => x);
    expect(changed).toEqual([
      ['  center: [0, -1.95, 0.15]   # near the back wall, on a stand', '  center: [0, -1.95, 0.16]   # near the back wall, on a stand'],
      [expect.stringMatching(/^ {2}throwRatio: 1\.6 +# /), expect.stringMatching(/^ {2}throwRatio: 1\.7 +# /)],
    ]);
    const back = loadRig(join(dir, 'demo-rig.live.yaml')).rig;
    expect(back.projector.throwRatio).toBe(1.7);
    expect(back.mirror.center[2]).toBeCloseTo(0.16, 12);
  });

  it('never replaces a file silently: 409 without overwrite, replaced with it; a plain name in the rig folder only', async () => {
    const { rig } = await session(server);
    const target = join(dir, 'mine.yaml');
    writeFileSync(target, '# keep me\n');
    const refused = await post(server, '/api/save', JSON.stringify({ rig, file: 'mine.yaml' }));
    expect(refused).toEqual({ status: 409, json: { error: 'mine.yaml already exists; save again with overwrite to replace it' } });
    expect(readFileSync(target, 'utf8')).toBe('# keep me\n');
    const own = await post(server, '/api/save', JSON.stringify({ rig, file: 'demo-rig.yaml' }));
    expect(own.status).toBe(409);
    const replaced = await post(server, '/api/save', JSON.stringify({ rig, file: 'mine.yaml', overwrite: true }));
    expect(replaced.status).toBe(200);
    expect(readFileSync(target, 'utf8')).toBe(readFileSync(rigPath, 'utf8'));
    for (const file of ['../escape.yaml', '/tmp/escape.yaml', 'sub/escape.yaml', '.hidden.yaml', 'rig.txt', 'a\\b.yaml']) {
      const a = await post(server, '/api/save', JSON.stringify({ rig, file }));
      expect(a.status, file).toBe(400);
      expect(a.json.error).toMatch(/^file: /);
    }
  });

  it('refuses a rig that cannot work, naming the field', async () => {
    const { rig } = await session(server);
    rig.mirror.radius = -1;
    expect(await post(server, '/api/save', JSON.stringify({ rig }))).toEqual({ status: 400, json: { error: 'rig.mirror.radius: expected a positive number' } });
    rig.mirror.radius = 0.3;
    rig.projector.lookAt = rig.projector.position;
    const same = await post(server, '/api/save', JSON.stringify({ rig }));
    expect(same.status).toBe(400);
    expect(same.json.error).toBe('rig: projector.lookAt: must differ from projector.position');
    expect((await post(server, '/api/save', JSON.stringify({ rig: 'no' }))).json.error).toBe('rig: expected an object');
  });

  it('bounds the body (413), wants JSON (415), and says when it is not JSON (400)', async () => {
    const huge = Buffer.alloc(2 ** 20 + 1, 0x20);
    expect(await post(server, '/api/save', huge)).toEqual({ status: 413, json: { error: 'the request body is larger than 1 MiB' } });
    const form = await post(server, '/api/save', 'rig=1', 'application/x-www-form-urlencoded');
    expect(form.status).toBe(415);
    expect(form.json.error).toBe('expected a JSON body (Content-Type: application/json), got "application/x-www-form-urlencoded"');
    expect((await post(server, '/api/save', '{"rig":', 'application/json; charset=utf-8')).json).toEqual({ error: 'the request body is not valid JSON' });
  });
});

describe('skyfold live: bake', () => {
  it('writes a .glb equal to skyfold bake of the same rig, and will not overwrite it', async () => {
    const { rig } = await session(server);
    const baked = await post(server, '/api/bake', JSON.stringify({ rig, formats: ['glb'] }));
    expect(baked).toEqual({ status: 200, json: { files: ['demo-rig.live.glb'] } });
    const cli = await skyfold(['bake', rigPath, '-o', join(dir, 'cli.glb')]);
    expect(cli.code, cli.stderr).toBe(0);
    expect(readFileSync(join(dir, 'demo-rig.live.glb')).equals(readFileSync(join(dir, 'cli.glb')))).toBe(true);
    const again = await post(server, '/api/bake', JSON.stringify({ rig, formats: ['glb'] }));
    expect(again).toEqual({ status: 409, json: { error: 'demo-rig.live.glb already exists; save again with overwrite to replace it' } });
    const bad = await post(server, '/api/bake', JSON.stringify({ rig, formats: ['exe'] }));
    expect(bad.status).toBe(400);
    expect(bad.json.error).toMatch(/^formats: expected each of glb, obj/);
    expect((await post(server, '/api/bake', JSON.stringify({ rig, formats: ['csv'], out: '../up' }))).status).toBe(400);
  });

  it('bakes the nudged rig, not the loaded one', async () => {
    const { rig } = await session(server);
    rig.projector.throwRatio = 1.7;
    const baked = await post(server, '/api/bake', JSON.stringify({ rig, formats: ['csv'], out: 'nudged.csv' }));
    expect(baked).toEqual({ status: 200, json: { files: ['nudged.csv'] } });
    const nudged = join(dir, 'nudged.yaml');
    writeFileSync(nudged, readFileSync(rigPath, 'utf8').replace('throwRatio: 1.6', 'throwRatio: 1.7'));
    expect((await skyfold(['bake', nudged, '-o', join(dir, 'nudged-cli.csv')])).code).toBe(0);
    expect(readFileSync(join(dir, 'nudged.csv'), 'utf8')).toBe(readFileSync(join(dir, 'nudged-cli.csv'), 'utf8'));
  });
});

describe('skyfold live: save on an as-built dome', () => {
  it('keeps the feet-and-inches strings and the dome.mesh line; the saved rig reads back with its triangles', async () => {
    const folder = tempDir('live-save-mesh');
    for (const f of ['school-dome-rig.yaml', 'school-dome.obj']) writeFileSync(join(folder, f), readFileSync(join(FIXTURES, f)));
    const s = await startLiveServer({ rig: join(folder, 'school-dome-rig.yaml') });
    try {
      const { rig, domeMesh } = await session(s);
      // one inch higher (1 in = 0.0254 m exactly, NIST SP 811 B.8)
      rig.projector.position[2] += 0.0254;
      expect(await post(s, '/api/save', JSON.stringify({ rig }))).toEqual({ status: 200, json: { file: 'school-dome-rig.live.yaml' } });
      const text = readFileSync(join(folder, 'school-dome-rig.live.yaml'), 'utf8');
      expect(text).toContain('  position: ["0 in", "-2 ft 8 in", "5 in"]   # the lens, on a low cart near the centre');
      expect(text).toContain('  mesh: school-dome.obj  # the dome as built (triangles, in feet, beside this file)');
      const back = loadRig(join(folder, 'school-dome-rig.live.yaml')).rig;
      expect(back.dome.mesh?.triangleCount).toBe(domeMesh.triangles);
    } finally {
      await s.close();
    }
  });
});
