import { PNG } from "pngjs";

// PNG encoding of RGBA pixels with pngjs (8-bit RGBA, colour type 6).

export function encodePng(rgba: Uint8Array, width: number, height: number): Buffer {
  if (rgba.length !== width * height * 4) throw new RangeError(`encodePng needs ${width * height * 4} bytes of RGBA for ${width} × ${height}; got ${rgba.length}`);
  const png = new PNG({ width, height, colorType: 6, inputHasAlpha: true });
  png.data = Buffer.from(rgba.buffer, rgba.byteOffset, rgba.byteLength);
  return PNG.sync.write(png, { colorType: 6, deflateLevel: 6 });
}
