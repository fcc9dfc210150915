/**
 * The live page's HTML and script. The script is packages/warp-cli/src/live/page/main.ts and what it
 * imports (warp-core included), bundled for the browser by esbuild (pinned in package.json) the first
 * time a process asks, then kept: one build per process.
 */
import { fileURLToPath } from 'node:url';

/** Where the page's token goes in the HTML: every URL the page names carries `t=TOKEN`. */
export const PAGE_TOKEN_SLOT = '__SKYFOLD_LIVE_TOKEN__';

const STYLE = `
html, body { margin: 0; height: 100%; background: #000; overflow: hidden; }
#view { display: block; width: 100vw; height: 100vh; object-fit: contain; image-rendering: pixelated; }
#status { position: fixed; left: 0.6em; bottom: 0.5em; font: 13px/1.3 system-ui, sans-serif; color: #9ab; pointer-events: none; }
`;

const HTML = `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><title>skyfold live</title>
<link rel="icon" href="data:,">
<meta name="viewport" content="width=device-width, initial-scale=1">
<style>${STYLE}</style>
</head><body>
<canvas id="view"></canvas>
<div id="status">loading…</div>
<script type="module" src="/app.js?t=${PAGE_TOKEN_SLOT}"></script>
</body></html>
`;

let built: Promise<string> | undefined;

async function buildScript(): Promise<string> {
  const { build } = await import('esbuild');
  // dist/live/assets.js → src/live/page/main.ts (the page is not compiled by tsc -b: it is browser code)
  const entry = fileURLToPath(new URL('../../src/live/page/main.ts', import.meta.url));
  const out = await build({
    entryPoints: [entry],
    bundle: true,
    write: false,
    format: 'esm',
    platform: 'browser',
    target: 'es2022',
    minify: true,
    legalComments: 'none',
    logLevel: 'silent',
  });
  return out.outputFiles[0].text;
}

/**
 * The page and its script. With `token`, the HTML names the script with it (the server's token,
 * which every request needs); without, the slot stays for the caller to fill.
 */
export async function livePageAssets(token?: string): Promise<{ html: string; js: string }> {
  built ??= buildScript().catch((e: unknown) => {
    built = undefined;
    throw e;
  });
  const js = await built;
  return { html: token === undefined ? HTML : HTML.replaceAll(PAGE_TOKEN_SLOT, encodeURIComponent(token)), js };
}
