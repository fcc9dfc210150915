/** `skyfold live --host`: what it listens on, whom it answers, and that it says what that exposes. */
import { request } from 'node:http';
import { networkInterfaces } from 'node:os';
import { describe, expect, it } from 'vitest';
import { startLiveServer, type LiveServer } from '@skyfold/warp-cli';
import { DEMO_RIG, spawnSkyfold, whileRunning } from './support.js';

function status(s: LiveServer, host: string, headers: Record<string, string> = {}, body?: Buffer[]): Promise<number> {
  return new Promise((ok, fail) => {
    const req = request({ host: '127.0.0.1', port: s.port, path: `/api/save?t=${s.token}`, method: body ? 'POST' : 'GET', headers: { host, ...headers }, agent: false }, (res) => {
      res.resume();
      res.on('end', () => ok(res.statusCode ?? 0));
    });
    req.on('error', fail);
    for (const chunk of body ?? []) req.write(chunk);
    req.end();
  });
}

describe('skyfold live --host', () => {
  it('on every interface (0.0.0.0) answers to this machine\'s own addresses, still not to a DNS name', async () => {
    const s = await startLiveServer({ rig: DEMO_RIG, host: '0.0.0.0' });
    try {
      expect(s.url).toBe(`http://127.0.0.1:${s.port}/?t=${s.token}`);
      const own = Object.values(networkInterfaces()).flatMap((l) => l ?? []).find((a) => a.family === 'IPv4' && !a.internal);
      // GET /api/save is a 405: past the Host check
      if (own) expect(await status(s, `${own.address}:${s.port}`)).toBe(405);
      expect(await status(s, `127.0.0.1:${s.port}`)).toBe(405);
      expect(await status(s, `dome.example:${s.port}`)).toBe(403);
    } finally {
      await s.close();
    }
  });

  it('refuses a chunked body past 1 MiB (no Content-Length to go by)', async () => {
    const s = await startLiveServer({ rig: DEMO_RIG });
    try {
      const chunks = Array.from({ length: 5 }, () => Buffer.alloc(300_000, 0x20));
      expect(await status(s, `127.0.0.1:${s.port}`, { 'content-type': 'application/json', 'transfer-encoding': 'chunked' }, chunks)).toBe(413);
    } finally {
      await s.close();
    }
  });

  it('says on standard error what listening beyond loopback exposes', async () => {
    const { child, done } = spawnSkyfold(['live', DEMO_RIG, '--host', '0.0.0.0']);
    let err = '';
    child.stderr!.on('data', (c) => (err += c));
    expect(await whileRunning(child, () => err.includes('\n'))).toBe(true);
    child.kill('SIGINT');
    const run = await done;
    expect(run.code).toBe(0);
    expect(run.stderr).toMatch(/^skyfold live: listening on 0\.0\.0\.0:\d+, not only on this machine: anyone who can reach that address and has the token can see the rig and the media given, and write rig and mesh files into .*demo-rig\.yaml's folder\n$/);
  });
});
