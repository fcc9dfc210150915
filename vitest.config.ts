import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    include: ['packages/*/test/**/*.test.ts', 'tests/**/*.test.ts'],
    testTimeout: 60_000,
    hookTimeout: 120_000,
    pool: 'forks',
    // vitest's default is one worker fewer than the cores (1 on the 2-core machine); the CLI tests
    // wait on sharp, ffmpeg and Chromium often enough that two keep both cores busy
    maxWorkers: 2,
    // a worker keeps its modules from one test file to the next: importing @skyfold/warp-cli (sharp,
    // commander, the whole CLI) once per worker, not once per file, halves the CLI tests' CPU time.
    // No test mocks modules, stubs globals or changes the working folder, so nothing leaks between files.
    isolate: false,
    // runs stay independent of each other: no map kept between them unless a test asks for it
    env: { SKYFOLD_MAP_CACHE: 'off' },
  },
});
