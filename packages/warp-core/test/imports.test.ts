/**
 * warp-core stays pure computation (docs/design.md, issue 9): no file, process or worker modules, no
 * sharp, no CLI. Reads every source file and checks each import, re-export, dynamic import, require and
 * use of the `process` global.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { dirname, join, relative, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';

const packageRoot = resolve(dirname(fileURLToPath(import.meta.url)), '..');
const sourceRoot = join(packageRoot, 'src');
const declared = Object.keys((JSON.parse(readFileSync(join(packageRoot, 'package.json'), 'utf8')) as { dependencies?: Record<string, string> }).dependencies ?? {});

const FORBIDDEN = /^(node:)?(fs|fs\/promises|child_process|worker_threads|process)$|^sharp$|^@skyfold\/warp-cli(\/|$)/;

function sourceFiles(dir: string): string[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap((entry) => {
    const path = join(dir, entry.name);
    if (entry.isDirectory()) return sourceFiles(path);
    return /\.(ts|js|mjs)$/.test(entry.name) && !entry.name.endsWith('.d.ts') ? [path] : [];
  });
}

/** The source without comments (strings are kept: specifiers live in them). */
function withoutComments(text: string): string {
  return text.replace(/\/\*[\s\S]*?\*\//g, ' ').replace(/(^|[^:'"`\\])\/\/.*$/gm, '$1');
}

/** What is wrong with one file's imports, as lines; empty when nothing is. */
function importProblems(text: string, file: string, fileDir: string): string[] {
  const code = withoutComments(text);
  const problems: string[] = [];
  const specifiers = [
    ...code.matchAll(/\b(?:import|export)\s[^;]*?\bfrom\s*['"]([^'"]+)['"]/g),
    ...code.matchAll(/\bimport\s*['"]([^'"]+)['"]/g),
    ...code.matchAll(/\b(?:import|require)\s*\(\s*['"]([^'"]+)['"]\s*\)/g),
  ].map((match) => match[1]);
  for (const spec of specifiers) {
    if (FORBIDDEN.test(spec)) problems.push(`${file}: imports ${spec}`);
    else if (spec.startsWith('.')) {
      if (relative(sourceRoot, resolve(fileDir, spec)).startsWith('..')) problems.push(`${file}: imports ${spec}, outside warp-core's src`);
    } else if (!declared.includes(spec.split('/')[0])) problems.push(`${file}: imports ${spec}, not a declared dependency of warp-core`);
  }
  if (/\brequire\s*\(/.test(code)) problems.push(`${file}: uses require`);
  if (/(^|[^.\w$'"])process\s*[.[]/m.test(code) || /\bglobalThis\s*\.\s*process\b/.test(code)) problems.push(`${file}: uses the process global`);
  return problems;
}

describe('warp-core imports', () => {
  it('the check catches each kind of forbidden import (so a clean tree means something)', () => {
    const dir = join(sourceRoot, 'optics');
    const bad = [
      "import { readFileSync } from 'node:fs';",
      "import { spawn } from 'child_process';",
      "export { Worker } from 'node:worker_threads';",
      "const sharp = await import('sharp');",
      "import { main } from '@skyfold/warp-cli';",
      "import { x } from '../../../warp-cli/src/main.js';",
      'const argv = process.argv;',
      "const fs = require('fs');",
    ];
    for (const line of bad) expect(importProblems(line, 'sample.ts', dir), line).not.toEqual([]);
    expect(importProblems("import { vec3 } from 'gl-matrix';\nimport { dot } from '../math.js';\n// process.exit() in a comment\n", 'sample.ts', dir)).toEqual([]);
  });

  it('no source file imports node:fs, child_process, worker_threads, process, sharp or the CLI', () => {
    const files = sourceFiles(sourceRoot);
    expect(files.length).toBeGreaterThan(40);
    const problems = files.flatMap((path) => importProblems(readFileSync(path, 'utf8'), relative(packageRoot, path), dirname(path)));
    expect(problems).toEqual([]);
  });
});
