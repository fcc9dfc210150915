/** `skyfold live` as a user runs it: the printed address, Ctrl-C, and the command line's errors. */
import { chmodSync, existsSync, readFileSync, writeFileSync } from 'node:fs';
import { get } from 'node:http';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { DEMO_RIG, skyfold, spawnSkyfold, tempDir, whileRunning } from './support.js';

function fetchJson(url: string): Promise<{ status: number; body: any }> {
  return new Promise((ok, fail) => {
    get(url, { agent: false }, (res) => {
      let text = '';
      res.on('data', (c) => (text += c));
      res.on('end', () => ok({ status: res.statusCode ?? 0, body: JSON.parse(text) }));
    }).on('error', fail);
  });
}

describe('skyfold live (the binary)', () => {
  it('prints one line with the address, serves the session there, and stops cleanly on SIGTERM', async () => {
    const { child, done } = spawnSkyfold(['live', DEMO_RIG, '--port', '0']);
    let out = '';
    child.stdout!.on('data', (c) => (out += c));
    expect(await whileRunning(child, () => out.includes('\n'))).toBe(true);
    const url = /http:\/\/127\.0\.0\.1:(\d+)\/\?t=([0-9a-f]{32})/.exec(out);
    expect(url, out).not.toBeNull();
    expect(out.trim().split('\n')).toHaveLength(1);
    const session = await fetchJson(`http://127.0.0.1:${url![1]}/api/session?t=${url![2]}`);
    expect(session.status).toBe(200);
    expect(session.body.rigFile).toBe('demo-rig.yaml');
    child.kill('SIGTERM');
    const run = await done;
    expect(run.code).toBe(0);
    expect(run.stderr).toBe('');
  });
});

describe('skyfold live: the command line', () => {
  it('refuses a bad port, a missing rig and media it cannot show, with one line and exit 2', async () => {
    const port = await skyfold(['live', DEMO_RIG, '--port', '70000']);
    expect(port.code).toBe(2);
    expect(port.stderr).toBe('skyfold: --port: expected a port from 0 (any free one) to 65535, got "70000"\n');
    const rig = await skyfold(['live', 'no-such-rig.yaml']);
    expect(rig.code, rig.stderr).toBe(2);
    expect(rig.stderr).toMatch(/^skyfold: .*no-such-rig\.yaml: cannot read the rig file: no such file\n$/);
    const media = await skyfold(['live', DEMO_RIG, 'no-such-show']);
    expect(media.code).toBe(2);
    expect(media.stderr).toBe('skyfold: no-such-show: no such file or folder\n');
    const kind = await skyfold(['live', DEMO_RIG, DEMO_RIG]);
    expect(kind.code).toBe(2);
    expect(kind.stderr).toMatch(/^skyfold: .*demo-rig\.yaml: expected a dome-master image \(\.png .*\), a video \(\.mp4 .*\) or a folder of images\n$/);
  });

  it('has help with examples', async () => {
    const help = await skyfold(['live', '--help']);
    expect(help.code).toBe(0);
    expect(help.stdout).toContain('Usage: skyfold live [options] <rig> [media...]');
    expect(help.stdout).toContain('--host <address>');
    expect(help.stdout).toContain('skyfold live rig.yaml show/ trailer.mp4 --open');
  });
});

describe('skyfold live --open --json', () => {
  const bin = tempDir('live-open');
  it.runIf(process.platform === 'linux')('prints the address as JSON and hands it to xdg-open', async () => {
    const seen = join(bin, 'opened.txt');
    writeFileSync(join(bin, 'xdg-open'), `#!/bin/sh\nprintf '%s' "$1" > "${seen}.part" && mv "${seen}.part" "${seen}"\n`);
    chmodSync(join(bin, 'xdg-open'), 0o755);
    const { child, done } = spawnSkyfold(['live', DEMO_RIG, '--open', '--json'], { env: { PATH: `${bin}:${process.env.PATH}` } });
    let out = '';
    child.stdout!.on('data', (c) => (out += c));
    expect(await whileRunning(child, () => out.includes('\n') && existsSync(seen))).toBe(true);
    const printed = JSON.parse(out);
    expect(Object.keys(printed)).toEqual(['url', 'port', 'token']);
    expect(printed.url).toBe(`http://127.0.0.1:${printed.port}/?t=${printed.token}`);
    expect(readFileSync(seen, 'utf8')).toBe(printed.url);
    child.kill('SIGINT');
    expect((await done).code).toBe(0);
  });
});
