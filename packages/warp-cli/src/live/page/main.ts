/**
 * The live page: reads the session, bakes the rig's warp in the browser with warp-core, and draws the
 * warped dome grid through WebGL 2 at the display's frame rate (one draw per animation frame).
 */
import { bakeMesh, type Rig, type WarpMesh } from '@skyfold/warp-core';
import { domeGrid } from './grid.js';
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
}

declare global {
  interface Window {
    skyfoldLive?: { ready: boolean; error?: string; state?: LiveState; pixels?: () => Uint8Array; frames?: () => number };
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
  const state: LiveState = { session, rig, mesh, drawer, frames: 0 };
  status(`${session.rigFile} · ${W} × ${H}`);
  const frame = () => {
    drawer.draw();
    state.frames++;
    requestAnimationFrame(frame);
  };
  drawer.draw();
  requestAnimationFrame(frame);
  window.skyfoldLive = { ready: true, state, pixels: () => drawer.read(), frames: () => state.frames };
}

start().catch((e: unknown) => {
  const message = e instanceof Error ? e.message : String(e);
  status(message);
  window.skyfoldLive = { ready: false, error: message };
});
