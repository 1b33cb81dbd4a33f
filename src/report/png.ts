/**
 * A minimal PNG writer for indexed-colour images (W3C, "Portable Network Graphics (PNG) Specification (Second
 * Edition)", 2003, also ISO/IEC 15948): signature, IHDR, PLTE, tRNS, one IDAT (zlib stream from node:zlib), IEND.
 * Each chunk is length, type, data and the CRC-32 of type and data (§5.3, Annex D).
 */
import { deflateSync } from 'node:zlib';

/** The eight signature bytes every PNG file starts with (PNG 2nd ed. §5.2). */
export const PNG_SIGNATURE = Uint8Array.of(137, 80, 78, 71, 13, 10, 26, 10);

/** CRC-32 table of the reflected polynomial 0xEDB88320 (PNG 2nd ed. Annex D, the sample code there). */
const CRC_TABLE = (() => {
  const table = new Uint32Array(256);
  for (let n = 0; n < 256; n++) {
    let c = n;
    for (let k = 0; k < 8; k++) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1;
    table[n] = c >>> 0;
  }
  return table;
})();

/** CRC-32 of bytes[start, end) (PNG 2nd ed. Annex D): initial value and final xor 0xFFFFFFFF. */
export function crc32(bytes: Uint8Array, start = 0, end = bytes.length): number {
  let c = 0xffffffff;
  for (let k = start; k < end; k++) c = CRC_TABLE[(c ^ bytes[k]!) & 0xff]! ^ (c >>> 8);
  return (c ^ 0xffffffff) >>> 0;
}

function chunk(type: string, data: Uint8Array): Uint8Array {
  const out = new Uint8Array(12 + data.length);
  const view = new DataView(out.buffer);
  view.setUint32(0, data.length);
  for (let k = 0; k < 4; k++) out[4 + k] = type.charCodeAt(k);
  out.set(data, 8);
  view.setUint32(8 + data.length, crc32(out, 4, 8 + data.length));
  return out;
}

export interface IndexedImage {
  width: number;
  height: number;
  /** width × height palette indices, rows from the top. */
  indices: Uint8Array;
  /** RGB triples, one per palette entry (at most 256). */
  palette: Uint8Array;
  /** Palette entries drawn fully transparent (their alpha in tRNS is 0; the others are opaque). */
  transparent?: readonly number[];
}

/** The PNG file of an indexed-colour image, bit depth 8, no interlace. Every row uses filter type 0 (None), which
 *  the specification recommends for palette images (PNG 2nd ed. §12.8). */
export function encodeIndexedPng(image: IndexedImage): Uint8Array {
  const { width, height, indices, palette } = image;
  if (!Number.isInteger(width) || !Number.isInteger(height) || width < 1 || height < 1) throw new Error(`PNG size must be positive integers, got ${width} × ${height}`);
  if (indices.length !== width * height) throw new Error(`PNG: ${width * height} indices expected, got ${indices.length}`);
  const entries = palette.length / 3;
  if (!Number.isInteger(entries) || entries < 1 || entries > 256) throw new Error(`PNG palette must hold 1 to 256 RGB triples, got ${palette.length} bytes`);
  const header = new Uint8Array(13);
  const hv = new DataView(header.buffer);
  hv.setUint32(0, width);
  hv.setUint32(4, height);
  header[8] = 8; // bit depth
  header[9] = 3; // colour type 3: indexed colour
  // compression 0 (deflate), filter method 0, interlace 0: the zeros already there.
  const raw = new Uint8Array(height * (width + 1));
  for (let j = 0; j < height; j++) {
    raw[j * (width + 1)] = 0; // filter type None
    raw.set(indices.subarray(j * width, (j + 1) * width), j * (width + 1) + 1);
  }
  const parts = [PNG_SIGNATURE, chunk('IHDR', header), chunk('PLTE', palette)];
  const transparent = image.transparent ?? [];
  if (transparent.length > 0) {
    // tRNS holds the alpha of the first entries; entries past its end are opaque (§11.3.2.1).
    const last = Math.max(...transparent);
    const alpha = new Uint8Array(last + 1).fill(255);
    for (const t of transparent) alpha[t] = 0;
    parts.push(chunk('tRNS', alpha));
  }
  parts.push(chunk('IDAT', new Uint8Array(deflateSync(raw, { level: 9 }))), chunk('IEND', new Uint8Array(0)));
  const out = new Uint8Array(parts.reduce((n, p) => n + p.length, 0));
  let at = 0;
  for (const p of parts) {
    out.set(p, at);
    at += p.length;
  }
  return out;
}

/** `data:image/png;base64,…` */
export function pngDataUri(png: Uint8Array): string {
  return `data:image/png;base64,${Buffer.from(png).toString('base64')}`;
}
