import { describe, expect, it } from 'vitest';
import { startChild, stopChild } from '../src/video/child.js';
import { FrameReader } from '../src/video/frame-stream.js';

// A child stopped while its output sits unread in the pipe must still be seen to end: Node's
// 'close' for a child waits for its stdout to reach its end, which an unread pipe never does.
describe('stopping a child early', () => {
  it('ends a child whose frames nobody reads, and its exit is seen', async () => {
    // writes 8 MB of "frames" and then waits, as a decoder does when its reader stops reading
    const script = 'process.stdout.write(Buffer.alloc(8 << 20, 7)); setInterval(() => {}, 1000);';
    const child = startChild(process.execPath, ['-e', script], 'ignore');
    const reader = new FrameReader(child.child.stdout!, 49_152);
    const frame = new Uint8Array(49_152);
    expect(await reader.next(frame)).toBe(true);
    expect(frame[0]).toBe(7);
    // let the pipe and the stream's buffer fill up behind the frame just read
    await new Promise((r) => setTimeout(r, 300));
    stopChild(child);
    const hung = Symbol('hung');
    const end = await Promise.race([child.exited.then(() => 'ended'), new Promise((r) => setTimeout(() => r(hung), 10_000))]);
    expect(end).toBe('ended');
    expect(child.child.signalCode).toBe('SIGKILL');
  });

  it('leaves a child that already ended as it was', async () => {
    const child = startChild(process.execPath, ['-e', 'process.exit(3)'], 'ignore');
    expect(await child.exited).toBe(3);
    stopChild(child);
    expect(child.child.exitCode).toBe(3);
  });
});
