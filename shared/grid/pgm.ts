import { GridFormatError, formatCount } from './errors.js';

/**
 * A greyscale raster as held in a Netpbm PGM file: width × height pixels, row-major from the
 * TOP row (image convention), values 0..maxval. Memory: 2 bytes per pixel.
 */
export interface PgmImage {
  width: number;
  height: number;
  maxval: number;
  pixels: Uint16Array;
}

/** Largest accepted width or height, in pixels (a 1 km side at 5 cm per cell). */
export const PGM_MAX_SIDE = 20_000;
/** Largest accepted pixel count (100 M pixels, 200 MB as a Uint16Array). */
export const PGM_MAX_PIXELS = 100_000_000;
/** Largest maxval the PGM format allows. */
export const PGM_MAX_MAXVAL = 65_535;

const ASCII_HASH = 0x23;
const ASCII_ZERO = 0x30;
const ASCII_NINE = 0x39;

/** True for the whitespace bytes the Netpbm formats allow: blank, TAB, LF, VT, FF, CR. */
function isSpace(b: number): boolean {
  return b === 0x20 || (b >= 0x09 && b <= 0x0d);
}

function isDigit(b: number): boolean {
  return b >= ASCII_ZERO && b <= ASCII_NINE;
}

/** Reads ASCII header tokens from a byte array, skipping whitespace and `#` comments. */
class HeaderReader {
  pos = 0;
  constructor(private readonly bytes: Uint8Array) {}

  /** Skips whitespace and comments; a comment runs from `#` to the next CR or LF. */
  skipSpaceAndComments(): void {
    const b = this.bytes;
    while (this.pos < b.length) {
      const c = b[this.pos];
      if (isSpace(c)) {
        this.pos++;
      } else if (c === ASCII_HASH) {
        this.skipComment();
      } else {
        return;
      }
    }
  }

  /** Skips from `#` up to and including the line end (LF or CR). */
  skipComment(): void {
    const b = this.bytes;
    while (this.pos < b.length && b[this.pos] !== 0x0a && b[this.pos] !== 0x0d) this.pos++;
    if (this.pos < b.length) this.pos++;
  }

  /**
   * Reads an unsigned decimal integer for the header field `what`; returns NaN past the end.
   * Digits are capped so that an absurd 40-digit width still reads as "too large", not Infinity.
   */
  readUint(what: string): number {
    this.skipSpaceAndComments();
    const b = this.bytes;
    if (this.pos >= b.length) {
      throw new GridFormatError(`The PGM header ends before its ${what}.`);
    }
    if (!isDigit(b[this.pos])) {
      throw new GridFormatError(
        `The PGM header's ${what} is not a whole number (found "${String.fromCharCode(b[this.pos])}").`,
      );
    }
    let value = 0;
    while (this.pos < b.length && isDigit(b[this.pos])) {
      value = Math.min(value * 10 + (b[this.pos] - ASCII_ZERO), Number.MAX_SAFE_INTEGER);
      this.pos++;
    }
    if (this.pos < b.length && !isSpace(b[this.pos]) && b[this.pos] !== ASCII_HASH) {
      throw new GridFormatError(
        `The PGM header's ${what} is not a whole number (found "${String.fromCharCode(b[this.pos])}" after the digits).`,
      );
    }
    return value;
  }
}

/** Checks the header numbers against the format's and our own limits. */
function checkDimensions(width: number, height: number, maxval: number): void {
  if (width === 0 || height === 0) {
    throw new GridFormatError(`The PGM header says ${width} × ${height} pixels; an image needs at least one pixel.`);
  }
  if (width > PGM_MAX_SIDE || height > PGM_MAX_SIDE) {
    throw new GridFormatError(
      `The PGM header says ${formatCount(width)} × ${formatCount(height)} pixels; Driftline accepts at most ${formatCount(PGM_MAX_SIDE)} pixels per side.`,
    );
  }
  if (width * height > PGM_MAX_PIXELS) {
    throw new GridFormatError(
      `The PGM header says ${formatCount(width)} × ${formatCount(height)} pixels; Driftline accepts at most ${formatCount(PGM_MAX_PIXELS)} pixels in all.`,
    );
  }
  if (maxval === 0 || maxval > PGM_MAX_MAXVAL) {
    throw new GridFormatError(
      `The PGM header gives a maximum grey value of ${formatCount(maxval)}; it must be between 1 and ${formatCount(PGM_MAX_MAXVAL)}.`,
    );
  }
}

/** Reads the binary (P5) raster starting at `start`: 1 byte per sample below 256, else 2 bytes big-endian. */
function readBinaryRaster(bytes: Uint8Array, start: number, width: number, height: number, maxval: number): Uint16Array {
  const n = width * height;
  const bytesPerSample = maxval < 256 ? 1 : 2;
  const needed = n * bytesPerSample;
  const available = bytes.length - start;
  if (available < needed) {
    throw new GridFormatError(
      `The PGM header says ${formatCount(width)} × ${formatCount(height)} pixels but the file holds only ${formatCount(Math.max(0, available))} bytes of pixel data (${formatCount(needed)} needed).`,
    );
  }
  const pixels = new Uint16Array(n);
  let bad = -1;
  if (bytesPerSample === 1) {
    for (let k = 0; k < n; k++) {
      const v = bytes[start + k];
      pixels[k] = v;
      if (v > maxval && bad < 0) bad = k;
    }
  } else {
    for (let k = 0, p = start; k < n; k++, p += 2) {
      const v = (bytes[p] << 8) | bytes[p + 1];
      pixels[k] = v;
      if (v > maxval && bad < 0) bad = k;
    }
  }
  if (bad >= 0) throwAboveMaxval(pixels[bad], bad, width, maxval);
  // Bytes after the raster are ignored: Netpbm allows several images in one stream, we read the first.
  return pixels;
}

function throwAboveMaxval(value: number, index: number, width: number, maxval: number): never {
  const row = Math.floor(index / width);
  const col = index % width;
  throw new GridFormatError(
    `Pixel (column ${formatCount(col)}, row ${formatCount(row)}) has grey value ${formatCount(value)}, above the header's maximum of ${formatCount(maxval)}.`,
  );
}

/** Reads the plain (P2) raster: ASCII decimal samples separated by whitespace; comments are skipped too. */
function readPlainRaster(reader: HeaderReader, bytes: Uint8Array, width: number, height: number, maxval: number): Uint16Array {
  const n = width * height;
  // Each value takes a digit and all but the last a separator: a file too short for the claimed
  // size is refused before 2 bytes per claimed pixel are allocated.
  const remaining = bytes.length - reader.pos;
  if (remaining < 2 * n - 1) {
    throw new GridFormatError(
      `The PGM header says ${formatCount(width)} × ${formatCount(height)} pixels but the file's ${formatCount(Math.max(0, remaining))} bytes after the header cannot hold that many grey values.`,
    );
  }
  const pixels = new Uint16Array(n);
  for (let k = 0; k < n; k++) {
    reader.skipSpaceAndComments();
    if (reader.pos >= bytes.length) {
      throw new GridFormatError(
        `The PGM header says ${formatCount(width)} × ${formatCount(height)} pixels but the file holds only ${formatCount(k)} grey values.`,
      );
    }
    const c = bytes[reader.pos];
    if (!isDigit(c)) {
      throw new GridFormatError(
        `Grey value number ${formatCount(k + 1)} is not a whole number (found "${String.fromCharCode(c)}").`,
      );
    }
    let v = 0;
    while (reader.pos < bytes.length && isDigit(bytes[reader.pos])) {
      v = Math.min(v * 10 + (bytes[reader.pos] - ASCII_ZERO), Number.MAX_SAFE_INTEGER);
      reader.pos++;
    }
    if (reader.pos < bytes.length && !isSpace(bytes[reader.pos]) && bytes[reader.pos] !== ASCII_HASH) {
      throw new GridFormatError(
        `Grey value number ${formatCount(k + 1)} is not a whole number (found "${String.fromCharCode(bytes[reader.pos])}" after the digits).`,
      );
    }
    if (v > maxval) throwAboveMaxval(v, k, width, maxval);
    pixels[k] = v;
  }
  return pixels;
}

/**
 * Parses a Netpbm PGM file, binary (P5) or plain (P2), into pixels row-major from the top row.
 * Throws GridFormatError with a readable sentence for anything that is not a valid PGM.
 */
export function parsePgm(bytes: Uint8Array): PgmImage {
  if (bytes.length < 2 || bytes[0] !== 0x50 || (bytes[1] !== 0x35 && bytes[1] !== 0x32)) {
    throw new GridFormatError('The file does not start with "P5" or "P2", so it is not a PGM greyscale image.');
  }
  const plain = bytes[1] === 0x32;
  const reader = new HeaderReader(bytes);
  reader.pos = 2;
  if (reader.pos < bytes.length && !isSpace(bytes[reader.pos]) && bytes[reader.pos] !== ASCII_HASH) {
    throw new GridFormatError('The file does not start with "P5" or "P2", so it is not a PGM greyscale image.');
  }
  const width = reader.readUint('width');
  const height = reader.readUint('height');
  const maxval = reader.readUint('maximum grey value');
  checkDimensions(width, height, maxval);

  if (plain) {
    return { width, height, maxval, pixels: readPlainRaster(reader, bytes, width, height, maxval) };
  }
  // The raster follows exactly one whitespace byte after maxval. A comment right after maxval is
  // skipped first; its line end does not count as that delimiter (Netpbm PBM/PGM specification).
  while (reader.pos < bytes.length && bytes[reader.pos] === ASCII_HASH) reader.skipComment();
  if (reader.pos >= bytes.length) {
    throw new GridFormatError(
      `The PGM header says ${formatCount(width)} × ${formatCount(height)} pixels but the file holds only 0 bytes of pixel data.`,
    );
  }
  reader.pos++; // the single delimiting whitespace byte
  return { width, height, maxval, pixels: readBinaryRaster(bytes, reader.pos, width, height, maxval) };
}

/** Checks that an image is self-consistent before writing it. */
function checkImage(img: PgmImage): void {
  checkDimensions(img.width, img.height, img.maxval);
  if (img.pixels.length !== img.width * img.height) {
    throw new GridFormatError(
      `The image is ${formatCount(img.width)} × ${formatCount(img.height)} pixels but holds ${formatCount(img.pixels.length)} pixel values.`,
    );
  }
  for (let k = 0; k < img.pixels.length; k++) {
    if (img.pixels[k] > img.maxval) throwAboveMaxval(img.pixels[k], k, img.width, img.maxval);
  }
}

/** Longest plain-PGM line we write, in characters (the format asks for at most 70). */
const PLAIN_LINE_LIMIT = 70;

/**
 * Writes an image as a Netpbm PGM file: binary P5 (default; 1 byte per pixel when maxval < 256,
 * else 2 bytes big-endian) or plain P2 (ASCII, lines of at most 70 characters). Returns the file bytes.
 */
export function encodePgm(img: PgmImage, format: 'P5' | 'P2' = 'P5'): Uint8Array {
  checkImage(img);
  const header = `${format}\n${img.width} ${img.height}\n${img.maxval}\n`;
  const n = img.width * img.height;
  if (format === 'P5') {
    const bytesPerSample = img.maxval < 256 ? 1 : 2;
    const out = new Uint8Array(header.length + n * bytesPerSample);
    for (let k = 0; k < header.length; k++) out[k] = header.charCodeAt(k);
    const start = header.length;
    if (bytesPerSample === 1) {
      for (let k = 0; k < n; k++) out[start + k] = img.pixels[k];
    } else {
      for (let k = 0, p = start; k < n; k++, p += 2) {
        out[p] = img.pixels[k] >> 8;
        out[p + 1] = img.pixels[k] & 0xff;
      }
    }
    return out;
  }
  // Plain: one image row starts a new line, long rows wrap below the 70-character limit.
  const parts: string[] = [header];
  for (let row = 0; row < img.height; row++) {
    let line = '';
    for (let col = 0; col < img.width; col++) {
      const s = String(img.pixels[row * img.width + col]);
      if (line.length > 0 && line.length + 1 + s.length > PLAIN_LINE_LIMIT) {
        parts.push(line, '\n');
        line = s;
      } else {
        line = line.length > 0 ? `${line} ${s}` : s;
      }
    }
    parts.push(line, '\n');
  }
  return new TextEncoder().encode(parts.join(''));
}
