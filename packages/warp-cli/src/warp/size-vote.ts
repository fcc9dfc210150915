/** The source size of a batch: the most common size among the frames' headers. */
import { readImageSize } from '../io/image-codec.js';

/**
 * Reads each input's header (an unreadable one is left out: it is reported when its turn comes) and
 * returns the most common width and height, so one odd frame at the head of a show fails alone.
 */
export async function voteSourceSize(inputs: string[]): Promise<[number, number] | undefined> {
  const sizes = new Map<string, number>();
  for (const input of inputs) {
    const wh = await readImageSize(input);
    if (wh) sizes.set(wh.join('x'), (sizes.get(wh.join('x')) ?? 0) + 1);
  }
  let size: [number, number] | undefined;
  let best = 0;
  for (const [key, count] of sizes) {
    if (count > best) {
      best = count;
      size = key.split('x').map(Number) as [number, number];
    }
  }
  return size;
}
