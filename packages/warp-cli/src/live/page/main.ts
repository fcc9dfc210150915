/**
 * The live page: reads the session, bakes the rig's warp in the browser with warp-core, and draws the
 * warped dome grid through WebGL 2 at the display's frame rate (one draw per animation frame).
 */
import { bakeMesh, type Rig, type WarpMesh } from '@skyfold/warp-core';
import { domeGrid } from './grid.js';
import { NudgeLog, QUANTITIES, formatAmount, stepFor, type Quantity } from './nudge.js';
import { createDrawer, type Drawer } from './draw.js';

interface Session {
  rigFile: string;
  units: string;
  rig: Rig;
  domeMesh: null | { url: string; triangles: number };
  rigText: string;
  media: { id: number; name: string; kind: 'image' | 'sequence' | 'video'; url: string; frames?: string[]; fps?: number }[];
}

/** Every request carries the server's token (DESIGN of `skyfold live`): taken from the page's own address. */
const token = new URLSearchParams(location.search).get('t') ?? '';
const withToken = (path: string) => `${path}${path.includes('?') ? '&' : '?'}t=${encodeURIComponent(token)}`;

function status(text: string): void {
  const el = document.getElementById('status');
  if (el) el.textContent = text;
}

interface LiveState {
  session: Session;
  rig: Rig;
  mesh: WarpMesh;
  drawer: Drawer;
  frames: number;
  log: NudgeLog;
  selected: number;
  /** The last bake: coarse while a key repeats, full otherwise; its time in ms. */
  lastBake: { coarse: boolean; ms: number; cols: number; rows: number };
}

declare global {
  interface Window {
    skyfoldLive?: { ready: boolean; error?: string; state?: LiveState; pixels?: () => Uint8Array; frames?: () => number; rig?: () => Rig };
  }
}

async function start(): Promise<void> {
  window.skyfoldLive = { ready: false };
  const res = await fetch(withToken('/api/session'));
  if (!res.ok) throw new Error(`the session could not be read: HTTP ${res.status}`);
  const session = (await res.json()) as Session;
  if (session.domeMesh) throw new Error('an as-built dome (dome.mesh) is not drawn by this page yet');
  const rig = { ...session.rig, dome: { ...session.rig.dome } } as Rig;
  delete (rig.dome as { mesh?: unknown }).mesh;
  const [W, H] = rig.projector.resolution;
  const canvas = document.getElementById('view') as HTMLCanvasElement;
  canvas.width = W;
  canvas.height = H;
  const drawer = createDrawer(canvas);
  const size = 2048;
  drawer.setTexture(domeGrid(size, rig.content.fov));
  const t0 = performance.now();
  const mesh = bakeMesh(rig).mesh;
  drawer.setMesh(mesh);
  const bakeMs = performance.now() - t0;
  console.info(`skyfold live: ${session.rigFile}, ${W} × ${H}, mesh ${mesh.cols} × ${mesh.rows} baked in ${bakeMs.toFixed(0)} ms`);
  const state: LiveState = { session, rig, mesh, drawer, frames: 0, log: new NudgeLog(rig), selected: 0, lastBake: { coarse: false, ms: bakeMs, cols: mesh.cols, rows: mesh.rows } };
  status(`${session.rigFile} · ${W} × ${H}`);
  setupNudging(state);
  const frame = () => {
    drawer.draw();
    state.frames++;
    requestAnimationFrame(frame);
  };
  drawer.draw();
  requestAnimationFrame(frame);
  window.skyfoldLive = { ready: true, state, pixels: () => drawer.read(), frames: () => state.frames, rig: () => state.rig };
}

/** Vertices across while a key is held: a coarse warp follows the key, the full one comes when it is let go. */
const COARSE_COLS = 17;

function rebake(state: LiveState, coarse: boolean): void {
  const rig = state.log.rig;
  const t0 = performance.now();
  try {
    const [W, H] = rig.projector.resolution;
    const rows = Math.max(2, Math.round(((COARSE_COLS - 1) * H) / W) + 1);
    const mesh = bakeMesh(rig, coarse ? { grid: [COARSE_COLS, rows] } : {}).mesh;
    state.rig = rig;
    state.mesh = mesh;
    state.drawer.setMesh(mesh);
    state.lastBake = { coarse, ms: performance.now() - t0, cols: mesh.cols, rows: mesh.rows };
  } catch (e) {
    status(`this rig cannot be drawn: ${e instanceof Error ? e.message : String(e)} (undo with U)`);
    return;
  }
  showPanel(state);
}

function nudge(state: LiveState, q: Quantity, sign: number, mods: { shiftKey?: boolean; altKey?: boolean }, coarse: boolean): void {
  state.log.push(q, sign * stepFor(q, mods));
  rebake(state, coarse);
}

function el<K extends keyof HTMLElementTagNameMap>(tag: K, text = '', cls = ''): HTMLElementTagNameMap[K] {
  const e = document.createElement(tag);
  if (text) e.textContent = text;
  if (cls) e.className = cls;
  return e;
}

/** The panel: every quantity with its coarse step and − / + buttons, the changes since load, undo and reset. */
function showPanel(state: LiveState): void {
  const panel = document.getElementById('panel');
  if (!panel) return;
  const units = state.session.units;
  panel.replaceChildren();
  panel.append(el('h2', `${state.session.rigFile}`));
  const table = el('table');
  QUANTITIES.forEach((q, i) => {
    const row = el('tr', '', i === state.selected ? 'sel' : '');
    const minus = el('button', '−');
    const plus = el('button', '+');
    minus.onclick = (e) => {
      state.selected = i;
      nudge(state, q, -1, e, false);
    };
    plus.onclick = (e) => {
      state.selected = i;
      nudge(state, q, +1, e, false);
    };
    const cell = el('td');
    cell.append(minus, plus);
    row.append(el('td', q.label), el('td', `step ${formatAmount(q.kind, q.step, units)}`, 'num'), cell);
    table.append(row);
  });
  panel.append(table);
  const changes = state.log.totals();
  panel.append(el('h3', changes.length ? 'changed since loading' : 'no changes since loading'));
  for (const c of changes) panel.append(el('div', `${c.q.label} ${c.total > 0 ? '+' : ''}${formatAmount(c.q.kind, c.total, units)}`, 'change'));
  const undo = el('button', 'undo (U)');
  undo.onclick = () => {
    if (state.log.undo()) rebake(state, false);
  };
  const reset = el('button', 'reset (R)');
  reset.onclick = () => {
    state.log.reset();
    rebake(state, false);
  };
  const row = el('div', '', 'actions');
  row.append(undo, reset);
  panel.append(row);
  const b = state.lastBake;
  panel.append(el('div', `warp ${b.cols} × ${b.rows}${b.coarse ? ' (coarse, key held)' : ''}, baked in ${b.ms.toFixed(0)} ms`, 'note'));
  panel.append(el('div', '[ ] choose · arrows nudge · Shift ×0.1 · Alt ×0.01 · U undo · R reset · P panel', 'note'));
}

function setupNudging(state: LiveState): void {
  showPanel(state);
  let held = false;
  window.addEventListener('keydown', (e) => {
    const q = QUANTITIES[state.selected];
    if (e.key === 'ArrowUp' || e.key === 'ArrowRight' || e.key === 'ArrowDown' || e.key === 'ArrowLeft') {
      e.preventDefault();
      held = e.repeat;
      nudge(state, q, e.key === 'ArrowUp' || e.key === 'ArrowRight' ? 1 : -1, e, e.repeat);
    } else if (e.key === ']' || e.key === '[') {
      state.selected = (state.selected + (e.key === ']' ? 1 : QUANTITIES.length - 1)) % QUANTITIES.length;
      showPanel(state);
    } else if (e.key === 'u' || e.key === 'U') {
      if (state.log.undo()) rebake(state, false);
    } else if (e.key === 'r' || e.key === 'R') {
      state.log.reset();
      rebake(state, false);
    } else if (e.key === 'p' || e.key === 'P') {
      document.getElementById('panel')?.classList.toggle('hidden');
    }
  });
  window.addEventListener('keyup', (e) => {
    if (held && e.key.startsWith('Arrow')) {
      held = false;
      rebake(state, false);
    }
  });
}

start().catch((e: unknown) => {
  const message = e instanceof Error ? e.message : String(e);
  status(message);
  window.skyfoldLive = { ready: false, error: message };
});
