/** `skyfold live`: a page on the projector to align the rig by eye and preview media through the warp. */
import { spawn } from 'node:child_process';
import { resolve } from 'node:path';
import { InvalidArgumentError, type Command } from 'commander';
import { loadRig } from '../io/document-file.js';
import { runContext, writeErr, writeOut } from '../io/run-context.js';
import { printJson } from '../format.js';
import { warn } from '../messages.js';
import { isLoopback, hostForUrl } from '../live/security.js';
import { startLiveServer, type LiveServer } from '../live/server.js';

interface LiveCliOptions {
  port: number;
  host?: string;
  open?: boolean;
  json?: boolean;
}

function parsePort(text: string): number {
  const n = Number(text);
  if (text.trim() === '' || !Number.isInteger(n) || n < 0 || n > 65535) throw new InvalidArgumentError(`expected a port from 0 (any free one) to 65535, got "${text}"`);
  return n;
}

/** The platform's own "open this address" program (argument arrays, no shell; `start` is a cmd built-in). */
function opener(url: string): [string, string[]] {
  if (process.platform === 'darwin') return ['open', [url]];
  if (process.platform === 'win32') return ['cmd', ['/c', 'start', '""', url]];
  return ['xdg-open', [url]];
}

function openInBrowser(url: string): void {
  const [cmd, args] = opener(url);
  try {
    const child = spawn(cmd, args, { stdio: 'ignore', detached: true });
    child.on('error', () => warn(`--open: could not start ${cmd}; open ${url} yourself`));
    child.unref();
  } catch {
    warn(`--open: could not start ${cmd}; open ${url} yourself`);
  }
}

/** Resolves at the first SIGINT or SIGTERM (Ctrl-C, or a service manager stopping it). */
function untilStopped(): Promise<NodeJS.Signals> {
  return new Promise((ok) => {
    const stop = (signal: NodeJS.Signals) => {
      process.off('SIGINT', stop);
      process.off('SIGTERM', stop);
      ok(signal);
    };
    process.on('SIGINT', stop);
    process.on('SIGTERM', stop);
  });
}

export function registerLive(program: Command): void {
  program
    .command('live')
    .description('serve a page to put on the projector: the warped grid and media drawn live, the rig nudged, marked, fitted, saved and baked from the browser')
    .argument('<rig>', 'rig file (YAML or JSON), or a .glb baked by skyfold')
    .argument('[media...]', 'dome-master images, videos, or folders of images (played as a sequence) to preview through the warp')
    .option('--port <n>', 'port to listen on (0: any free port)', parsePort, 0)
    .option('--host <address>', 'address to listen on instead of 127.0.0.1 (others on the network can then reach the page: they still need the token)')
    .option('--open', 'open the page in the default browser')
    .option('--json', 'print the address as JSON ({"url", "port", "token"}) instead of a sentence')
    .addHelpText(
      'after',
      '\nThe page answers only requests that carry the token in the printed address. Stop the server with Ctrl-C.\n' +
        '\nExamples:\n  skyfold live rig.yaml\n  skyfold live rig.yaml show/ trailer.mp4 --open\n  skyfold live rig.yaml --port 8765',
    )
    .action(async (rigPath: string, media: string[], opts: LiveCliOptions) => {
      // the run's folder (a run in-process may leave it unset: then the process's, which the run has entered)
      const cwd = runContext().cwd ?? process.cwd();
      const loaded = loadRig(resolve(cwd, rigPath));
      loaded.warnings.forEach(warn);
      const server: LiveServer = await startLiveServer({ rig: rigPath, media, port: opts.port, host: opts.host, cwd, loaded });
      if (opts.json) printJson({ url: server.url, port: server.port, token: server.token });
      else writeOut(`skyfold live: open ${server.url} (Ctrl-C to stop)\n`);
      if (opts.host !== undefined && !isLoopback(opts.host)) {
        writeErr(
          `skyfold live: listening on ${hostForUrl(opts.host)}:${server.port}, not only on this machine: anyone who can reach that address and has the token can see the rig and the media given, and write rig and mesh files into ${rigPath}'s folder\n`,
        );
      }
      if (opts.open) openInBrowser(server.url);
      await untilStopped();
      await server.close();
    });
}
