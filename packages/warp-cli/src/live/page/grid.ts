/** The grid the live page draws on the dome (also drawn by its test, for `skyfold warp`). */
import { DEG, drawDomePattern } from '@skyfold/warp-core';

/** Rings every 10° of altitude, spokes every 30° of azimuth, each spoke numbered in degrees just above the springline. */
export function domeGrid(size: number, fov: number) {
  const dots = [];
  for (let az = 0; az < 360; az += 30) dots.push({ azimuth: az * DEG, altitude: 4 * DEG, label: String(az) });
  return drawDomePattern({ size, fov, ringStep: 10 * DEG, spokeStep: 30 * DEG, ringLabels: true, directionMarks: true, zenithTarget: true, dots });
}
