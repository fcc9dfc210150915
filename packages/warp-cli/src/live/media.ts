/**
 * The files the live server may hand out: the media named on the command line (an image, a video, or
 * a folder played as a sequence) and nothing else. Each gets a number; a request names the number, never
 * a path, so no request can reach a file outside this list.
 */
import { lstatSync, readdirSync, realpathSync, statSync } from 'node:fs';
import { basename, extname, join, resolve, sep } from 'node:path';
import { UserError } from '../errors.js';
import { IMAGE_EXTENSIONS, naturalCompare } from '../warp/inputs.js';
import { VIDEO_EXTENSIONS } from '../video/encode.js';

export type MediaKind = 'image' | 'sequence' | 'video';

export interface MediaItem {
  id: number;
  name: string;
  kind: MediaKind;
  /** The image or video file; for a sequence, its frames in the order `warp` reads a folder. */
  files: string[];
}

/** Content types by extension (IANA media types; Matroska's is the unregistered one browsers use). */
const CONTENT_TYPES: Record<string, string> = {
  '.png': 'image/png',
  '.jpg': 'image/jpeg',
  '.jpeg': 'image/jpeg',
  '.tif': 'image/tiff',
  '.tiff': 'image/tiff',
  '.webp': 'image/webp',
  '.mp4': 'video/mp4',
  '.mov': 'video/quicktime',
  '.mkv': 'video/x-matroska',
  '.webm': 'video/webm',
  '.avi': 'video/x-msvideo',
};

export function contentType(path: string): string {
  return CONTENT_TYPES[extname(path).toLowerCase()] ?? 'application/octet-stream';
}

const isImage = (name: string) => IMAGE_EXTENSIONS.includes(extname(name).toLowerCase());
const isVideo = (name: string) => VIDEO_EXTENSIONS.includes(extname(name).toLowerCase());

/** Inside `dir` (both real paths). */
function within(dir: string, path: string): boolean {
  return path.startsWith(dir.endsWith(sep) ? dir : dir + sep);
}

/**
 * A folder's images as a sequence, sorted as `warp` sorts a folder; hidden files and links that lead
 * out of the folder are left out (the folder is what the user named, not wherever its links point).
 */
function sequenceFrames(dir: string): string[] {
  const real = realpathSync(dir);
  const frames: string[] = [];
  for (const name of readdirSync(dir).filter((n) => isImage(n) && !n.startsWith('.')).sort(naturalCompare)) {
    const path = join(dir, name);
    try {
      if (lstatSync(path).isSymbolicLink() && !within(real, realpathSync(path))) continue;
      if (!statSync(path).isFile()) continue;
    } catch {
      continue;
    }
    frames.push(path);
  }
  return frames;
}

/** The media list from the command line's paths (relative to `cwd`); a path that is none of the three is a UserError. */
export function collectMedia(paths: readonly string[], cwd: string): MediaItem[] {
  return paths.map((given, id) => {
    const path = resolve(cwd, given);
    let st;
    try {
      st = statSync(path);
    } catch {
      throw new UserError(`${given}: no such file or folder`);
    }
    if (st.isDirectory()) {
      const files = sequenceFrames(path);
      if (files.length === 0) throw new UserError(`${given}: a folder with no images in it (expected ${IMAGE_EXTENSIONS.join(' ')})`);
      return { id, name: basename(path), kind: 'sequence', files };
    }
    if (!st.isFile()) throw new UserError(`${given}: not a regular file or folder`);
    if (isImage(path)) return { id, name: basename(path), kind: 'image', files: [path] };
    if (isVideo(path)) return { id, name: basename(path), kind: 'video', files: [path] };
    throw new UserError(`${given}: expected a dome-master image (${IMAGE_EXTENSIONS.join(' ')}), a video (${VIDEO_EXTENSIONS.join(' ')}) or a folder of images`);
  });
}
