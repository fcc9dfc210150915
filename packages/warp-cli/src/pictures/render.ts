/** Pictures to PNG: an SVG document rendered by sharp (its libvips draws SVG with librsvg), and dense rasters for embedding. */
import sharp from 'sharp';

/** Renders an SVG document to a PNG of the document's own size (72 dpi: one SVG pixel per PNG pixel). */
export async function svgToPng(svg: string): Promise<Buffer> {
  return sharp(Buffer.from(svg), { density: 72 }).png({ compressionLevel: 9 }).toBuffer();
}

/** An RGBA raster (row-major, 4 bytes a pixel, first row at the top) as a PNG data: URI for an SVG <image>. */
export async function rasterDataUri(rgba: Uint8Array | Uint8ClampedArray, width: number, height: number): Promise<string> {
  const png = await sharp(Buffer.from(rgba.buffer, rgba.byteOffset, rgba.byteLength), { raw: { width, height, channels: 4 } }).png({ compressionLevel: 9 }).toBuffer();
  return `data:image/png;base64,${png.toString('base64')}`;
}
