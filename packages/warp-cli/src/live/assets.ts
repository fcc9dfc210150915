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
#panel { position: fixed; right: 0.6em; top: 0.6em; max-width: 24em; padding: 0.5em 0.7em; background: rgba(14, 20, 28, 0.86); color: #d6dee6; font: 13px/1.35 system-ui, sans-serif; border-left: 3px solid #3a8fb7; }
#panel.hidden { display: none; }
#panel h2 { font-size: 14px; margin: 0 0 0.3em; color: #8fd0ee; }
#panel h3 { font-size: 12px; margin: 0.6em 0 0.2em; color: #a0b0bd; font-weight: 600; }
#panel table { border-collapse: collapse; }
#panel td { padding: 1px 0.4em 1px 0; }
#panel tr.sel td:first-child { color: #ffd27a; }
#panel .num { color: #8a9aa6; font-variant-numeric: tabular-nums; }
#panel button { font: inherit; min-width: 1.8em; margin-left: 2px; background: #22303c; color: #e8eef3; border: 1px solid #3c4e5c; border-radius: 3px; cursor: pointer; }
#panel .actions { margin-top: 0.4em; }
#panel .note { color: #7d8c97; font-size: 11px; margin-top: 0.3em; }
#panel .change { font-variant-numeric: tabular-nums; }
#status { position: fixed; left: 0.6em; bottom: 0.5em; font: 13px/1.3 system-ui, sans-serif; color: #9ab; pointer-events: none; }
`;

const HTML = `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><title>skyfold live</title>
<link rel="icon" href="data:,">
<meta name="viewport" content="width=device-width, initial-scale=1">
<style>${STYLE}</style>
</head><body>
<canvas id="view"></canvas>
<div id="panel"></div>
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
