/**
 * An HDR source (issue 13): a video whose transfer is PQ (SMPTE ST 2084) or HLG (ARIB STD-B67) is warped
 * and tagged as it came — the transfer and primaries carried to the output — but skyfold's light per
 * pixel goes through the sRGB curve (IEC 61966-2-1), so the run says so in one warning instead of being
 * silently wrong; an SDR source gets no such word. Tiny 10-bit HEVC sources, 4 frames.
 */
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { hdrTransferWarning } from '@skyfold/warp-cli';
import { setUpVideoWork, skyfold, streamField, testVideo, TOOLS } from './video-fixtures.js';

describe('the HDR warning', () => {
  it('names PQ and HLG, and nothing else', () => {
    const at = (transfer?: string) => hdrTransferWarning({ path: 'show.mov', colour: { transfer } });
    expect(at('smpte2084')).toMatch(/^show\.mov: an HDR video \(transfer PQ \(SMPTE ST 2084\)\).*sRGB curve, not PQ's.*--brightness 0/);
    expect(at('arib-std-b67')).toMatch(/HLG \(ARIB STD-B67\).*not HLG's/);
    for (const t of [undefined, 'bt709', 'iec61966-2-1', 'smpte170m']) expect(at(t)).toBeUndefined();
  });
});

describe.skipIf(!TOOLS)('an HDR video through the CLI', () => {
  let work: string;
  let rig: string;
  beforeAll(() => ({ work, rig } = setUpVideoWork('hdr')));

  for (const [transfer, name] of [['smpte2084', 'PQ'], ['arib-std-b67', 'HLG']] as const) {
    it(`${name}: warped, the tags carried, one warning`, async () => {
      const tags = ['-color_primaries', 'bt2020', '-color_trc', transfer, '-colorspace', 'bt2020nc'];
      const input = testVideo(work, `${name}.mkv`, 64, '25', 4, ['-c:v', 'libx265', '-pix_fmt', 'yuv420p10le', '-x265-params', 'log-level=error', ...tags]);
      const output = join(work, `${name}-warped.mkv`);
      const r = await skyfold(['warp', rig, input, '-o', output, '--codec', 'hevc', '--json']);
      expect(r.code, r.stderr).toBe(0);
      const warnings = r.stderr.split('\n').filter((l) => l.startsWith('skyfold: warning: '));
      expect(warnings).toHaveLength(1);
      expect(warnings[0]).toContain(`an HDR video (transfer ${name} (`);
      expect(streamField(output, 'color_transfer')).toBe(transfer);
      expect(streamField(output, 'color_primaries')).toBe('bt2020');
      expect(streamField(output, 'pix_fmt')).toBe('yuv420p10le');
    });
  }

  it('SDR (BT.709): no warning', async () => {
    const input = testVideo(work, 'sdr.mp4', 64, '25', 4, ['-c:v', 'libx264', '-pix_fmt', 'yuv420p', '-color_trc', 'bt709', '-color_primaries', 'bt709', '-colorspace', 'bt709']);
    const r = await skyfold(['warp', rig, input, '-o', join(work, 'sdr-warped.mp4'), '--json']);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).not.toMatch(/warning/);
  });
});
