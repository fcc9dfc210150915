/** The live page's HTML and script (a placeholder until the page is built). */
export async function livePageAssets(): Promise<{ html: string; js: string }> {
  return {
    html: '<!doctype html><html><head><meta charset="utf-8"><title>skyfold live</title></head><body><p>The live page is not built yet.</p></body></html>\n',
    js: '',
  };
}
