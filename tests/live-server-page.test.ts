/**
 * The page served by the real `skyfold live` server asks for its script with the server's token: the
 * page may run no inline script (its security policy), so the script's address in the HTML must carry
 * the token, or the script request is refused (403) and the page never starts.
 */
import { request } from 'node:http';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startLiveServer, type LiveServer } from '@skyfold/warp-cli';
import { DEMO_RIG, tempDir } from './support.js';

function get(port: number, path: string): Promise<{ status: number; body: string }> {
  return new Promise((ok, fail) => {
    const req = request({ host: '127.0.0.1', port, path, headers: { host: `127.0.0.1:${port}` }, agent: false }, (res) => {
      let body = '';
      res.on('data', (c: Buffer) => (body += c.toString('utf8')));
      res.on('end', () => ok({ status: res.statusCode ?? 0, body }));
      res.on('error', fail);
    });
    req.on('error', fail);
    req.end();
  });
}

let server: LiveServer;
beforeAll(async () => {
  server = await startLiveServer({ rig: DEMO_RIG, media: [], cwd: tempDir('live-page-token') });
});
afterAll(() => server.close());

describe('the page through the real server', () => {
  it("names its script with this server's token, and that script is served", async () => {
    const page = await get(server.port, `/?t=${server.token}`);
    expect(page.status).toBe(200);
    const src = /<script[^>]*\bsrc="([^"]+)"/.exec(page.body)?.[1];
    expect(src).toBe(`/app.js?t=${server.token}`);
    const script = await get(server.port, src!);
    expect(script.status).toBe(200);
    expect(script.body.length).toBeGreaterThan(1000);
  });
});
