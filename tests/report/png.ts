/**
 * A small PNG decoder for checking screenshots (PNG specification, W3C Recommendation, 2nd ed.
 * 2003: chunk layout §5, IHDR §11.2.2, zlib-compressed IDAT §10, scanline filters 0–4 §9.2 with
 * the Paeth predictor §9.4). Supports 8-bit greyscale, RGB, greyscale+alpha and RGBA without
 * interlacing — what headless Chromium writes. Inflation is node:zlib's.
 */
import { inflateSync } from 'node:zlib';

/** A decoded image: 8-bit channels, row-major. */
export interface DecodedPng {
  width: number;
  height: number;
  /** Channels per pixel (1, 2, 3 or 4). */
  channels: number;
  /** Pixel bytes, `width × height × channels`. */
  pixels: Uint8Array;
}

const SIGNATURE = [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a];
const CHANNELS: Record<number, number> = { 0: 1, 2: 3, 4: 2, 6: 4 };

/**
 * Decodes a PNG file's bytes.
 *
 * @param bytes - the file
 * @throws Error for a bad signature, an unsupported colour type or bit depth, interlacing, or a filter type above 4
 */
export function decodePng(bytes: Uint8Array): DecodedPng {
  SIGNATURE.forEach((b, i) => {
    if (bytes[i] !== b) throw new Error('not a PNG file (signature)');
  });
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  let offset = 8;
  let width = 0;
  let height = 0;
  let channels = 0;
  const data: Uint8Array[] = [];
  while (offset < bytes.length) {
    const length = view.getUint32(offset);
    const type = String.fromCharCode(...bytes.subarray(offset + 4, offset + 8));
    const body = bytes.subarray(offset + 8, offset + 8 + length);
    if (type === 'IHDR') {
      width = view.getUint32(offset + 8);
      height = view.getUint32(offset + 12);
      const depth = body[8];
      const colour = body[9] as number;
      const interlace = body[12];
      if (depth !== 8) throw new Error(`bit depth ${depth} not supported`);
      if (interlace !== 0) throw new Error('interlaced PNG not supported');
      channels = CHANNELS[colour] ?? 0;
      if (channels === 0) throw new Error(`colour type ${colour} not supported`);
    } else if (type === 'IDAT') data.push(body);
    else if (type === 'IEND') break;
    offset += 12 + length;
  }
  const raw = inflateSync(Buffer.concat(data));
  const stride = width * channels;
  const pixels = new Uint8Array(height * stride);
  for (let row = 0; row < height; row++) {
    const filter = raw[row * (stride + 1)] as number;
    const line = raw.subarray(row * (stride + 1) + 1, (row + 1) * (stride + 1));
    const out = pixels.subarray(row * stride, (row + 1) * stride);
    const previous = row > 0 ? pixels.subarray((row - 1) * stride, row * stride) : new Uint8Array(stride);
    for (let i = 0; i < stride; i++) {
      const a = i >= channels ? (out[i - channels] as number) : 0;
      const b = previous[i] as number;
      const c = i >= channels ? (previous[i - channels] as number) : 0;
      const x = line[i] as number;
      let value: number;
      switch (filter) {
        case 0:
          value = x;
          break;
        case 1:
          value = x + a;
          break;
        case 2:
          value = x + b;
          break;
        case 3:
          value = x + ((a + b) >> 1);
          break;
        case 4: {
          const p = a + b - c;
          const pa = Math.abs(p - a);
          const pb = Math.abs(p - b);
          const pc = Math.abs(p - c);
          value = x + (pa <= pb && pa <= pc ? a : pb <= pc ? b : c);
          break;
        }
        default:
          throw new Error(`filter type ${filter} on row ${row}`);
      }
      out[i] = value & 0xff;
    }
  }
  return { width, height, channels, pixels };
}

/**
 * Luminance statistics of an image (ITU-R BT.709 weights on the 8-bit values, alpha ignored):
 * mean, variance, and the fraction of pixels that differ from the most common value (the page
 * background) by more than 16 levels.
 *
 * @param image - decoded image
 */
export function luminanceStatistics(image: DecodedPng): {
  mean: number;
  variance: number;
  inkFraction: number;
} {
  const { pixels, channels } = image;
  const count = image.width * image.height;
  const values = new Float64Array(count);
  const histogram = new Uint32Array(256);
  for (let p = 0; p < count; p++) {
    const i = p * channels;
    const y =
      channels >= 3
        ? 0.2126 * (pixels[i] as number) +
          0.7152 * (pixels[i + 1] as number) +
          0.0722 * (pixels[i + 2] as number)
        : (pixels[i] as number);
    values[p] = y;
    histogram[Math.round(y)]! += 1;
  }
  const mean = values.reduce((s, v) => s + v, 0) / count;
  const variance = values.reduce((s, v) => s + (v - mean) ** 2, 0) / count;
  const background = histogram.indexOf(Math.max(...histogram));
  let ink = 0;
  for (const v of values) if (Math.abs(v - background) > 16) ink++;
  return { mean, variance, inkFraction: ink / count };
}
