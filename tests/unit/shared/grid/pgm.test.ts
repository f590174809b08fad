import { describe, expect, it } from 'vitest';
import { GridFormatError } from '../../../../shared/grid/errors.js';
import { encodePgm, parsePgm, type PgmImage } from '../../../../shared/grid/pgm.js';

const ascii = (s: string): Uint8Array => new TextEncoder().encode(s);

/** Concatenates an ASCII header with raw raster bytes. */
function withRaster(header: string, raster: number[]): Uint8Array {
  const h = ascii(header);
  const out = new Uint8Array(h.length + raster.length);
  out.set(h, 0);
  out.set(raster, h.length);
  return out;
}

// The "feep" graymap: the worked example printed in the PGM format description
// (Jef Poskanzer, pgm(5) manual page, 1989; the same example is kept in the Netpbm PGM
// specification, netpbm.sourceforge.net/doc/pgm.html).
const FEEP = `P2
# feep.pgm
24 7
15
0  0  0  0  0  0  0  0  0  0  0  0  0  0  0  0  0  0  0  0  0  0  0  0
0  3  3  3  3  0  0  7  7  7  7  0  0 11 11 11 11  0  0 15 15 15 15  0
0  3  0  0  0  0  0  7  0  0  0  0  0 11  0  0  0  0  0 15  0  0 15  0
0  3  3  3  0  0  0  7  7  7  0  0  0 11 11 11  0  0  0 15 15 15 15  0
0  3  0  0  0  0  0  7  0  0  0  0  0 11  0  0  0  0  0 15  0  0  0  0
0  3  0  0  0  0  0  7  7  7  7  0  0 11 11 11 11  0  0 15  0  0  0  0
0  0  0  0  0  0  0  0  0  0  0  0  0  0  0  0  0  0  0  0  0  0  0  0
`;

function expectFormatError(fn: () => unknown, pattern: RegExp): void {
  let caught: unknown;
  try {
    fn();
  } catch (e) {
    caught = e;
  }
  expect(caught).toBeInstanceOf(GridFormatError);
  expect((caught as Error).message).toMatch(pattern);
  // One readable sentence: starts with a capital, ends with a full stop.
  expect((caught as Error).message).toMatch(/^[A-Z].*\.$/);
}

describe('parsePgm', () => {
  it('when reading the feep example of the PGM specification, then size, maxval and the pixels in reading order match', () => {
    // Arrange: example from the pgm(5) manual page / netpbm.sourceforge.net/doc/pgm.html
    const bytes = ascii(FEEP);

    // Act
    const img = parsePgm(bytes);

    // Assert: values read off the printed example (row 1 starts "0 3 3 3 3 0 0 7").
    expect([img.width, img.height, img.maxval]).toEqual([24, 7, 15]);
    expect(Array.from(img.pixels.subarray(24, 32))).toEqual([0, 3, 3, 3, 3, 0, 0, 7]);
    expect(img.pixels[1 * 24 + 19]).toBe(15);
    expect(img.pixels[3 * 24 + 13]).toBe(11);
    // The letters F, E, E, P cover 10, 13, 13 and 12 pixels of grey 3, 7, 11 and 15.
    expect(img.pixels.reduce((a, b) => a + b, 0)).toBe(3 * 10 + 7 * 13 + 11 * 13 + 15 * 12);
  });

  it('when a P5 header has comments, tabs and CRs between its fields, then it is read (Netpbm PGM spec: whitespace is blanks, TABs, CRs, LFs; "#" to end of line is a comment)', () => {
    // Arrange: netpbm.sourceforge.net/doc/pgm.html and pbm.html on whitespace and comments.
    const bytes = withRaster('P5 # made by hand\r\n#another\n 3\t# w\n\n2 #h\r255\n', [0, 1, 2, 3, 4, 254]);

    // Act
    const img = parsePgm(bytes);

    // Assert
    expect([img.width, img.height, img.maxval]).toEqual([3, 2, 255]);
    expect(Array.from(img.pixels)).toEqual([0, 1, 2, 3, 4, 254]);
  });

  it('when the first raster byte looks like whitespace or "#", then it is still pixel data (Netpbm PGM spec: a single whitespace byte follows maxval)', () => {
    // Arrange: netpbm.sourceforge.net/doc/pgm.html — "A single whitespace character (usually a newline)".
    const bytes = withRaster('P5\n2 2\n255\n', [0x0a, 0x23, 0x20, 0x09]);

    // Act
    const img = parsePgm(bytes);

    // Assert
    expect(Array.from(img.pixels)).toEqual([0x0a, 0x23, 0x20, 0x09]);
  });

  it('when a comment sits right after maxval, then one more whitespace byte delimits the raster (Netpbm PBM/PGM spec on comments before the raster)', () => {
    // Arrange: netpbm.sourceforge.net/doc/pbm.html — "the newline at the end of the comment is not
    // sufficient to delimit the raster".
    const bytes = withRaster('P5\n2 1\n255# note\n\n', [7, 9]);

    // Act
    const img = parsePgm(bytes);

    // Assert
    expect(Array.from(img.pixels)).toEqual([7, 9]);
  });

  it('when maxval is 256 or more, then samples are two bytes, most significant first (Netpbm PGM spec)', () => {
    // Arrange: netpbm.sourceforge.net/doc/pgm.html — "If the Maxval is less than 256, it is 1 byte.
    // Otherwise, it is 2 bytes. The most significant byte is first."
    const bytes = withRaster('P5\n2 1\n65535\n', [0x01, 0x02, 0xff, 0xfe]);

    // Act
    const img = parsePgm(bytes);

    // Assert
    expect(Array.from(img.pixels)).toEqual([0x0102, 0xfffe]);
  });

  it('when maxval is 1, then a one-bit image reads as 0/1 samples', () => {
    // Arrange
    const bytes = ascii('P2 2 2 1\n0 1\n1 0\n');

    // Act
    const img = parsePgm(bytes);

    // Assert
    expect(Array.from(img.pixels)).toEqual([0, 1, 1, 0]);
  });

  it('when the magic number is not P5 or P2, then a GridFormatError says it is not a PGM', () => {
    expectFormatError(() => parsePgm(ascii('P6\n1 1\n255\n\0\0\0')), /not a PGM/);
    expectFormatError(() => parsePgm(ascii('GIF89a')), /not a PGM/);
    expectFormatError(() => parsePgm(ascii('P55 1 1 255\n\0')), /not a PGM/);
    expectFormatError(() => parsePgm(new Uint8Array(0)), /not a PGM/);
  });

  it('when maxval is 0 or above 65535, then a GridFormatError names the allowed range (Netpbm PGM spec: 0 < maxval < 65536)', () => {
    // netpbm.sourceforge.net/doc/pgm.html — "Must be less than 65536 and more than zero."
    expectFormatError(() => parsePgm(withRaster('P5 1 1 0\n', [0])), /between 1 and 65,535/);
    expectFormatError(() => parsePgm(withRaster('P5 1 1 65536\n', [0, 0])), /65,536.*between 1 and 65,535/);
  });

  it('when width or height is 0 or absurd, then a GridFormatError states the limit', () => {
    expectFormatError(() => parsePgm(ascii('P5 0 10 255\n')), /at least one pixel/);
    expectFormatError(() => parsePgm(ascii('P5 20001 10 255\n')), /at most 20,000 pixels per side/);
    expectFormatError(() => parsePgm(ascii('P5 15000 15000 255\n')), /at most 100,000,000 pixels in all/);
    expectFormatError(
      () => parsePgm(ascii('P5 99999999999999999999999999999 1 255\n')),
      /at most 20,000 pixels per side/,
    );
  });

  it('when P5 pixel data is short, then the message gives the size and the bytes found', () => {
    // Arrange
    const bytes = withRaster('P5\n640 480\n255\n', new Array(1200).fill(0));

    // Act / Assert
    expectFormatError(
      () => parsePgm(bytes),
      /says 640 × 480 pixels but the file holds only 1,200 bytes of pixel data/,
    );
    expectFormatError(() => parsePgm(withRaster('P5\n2 1\n65535\n', [0, 1, 2])), /only 3 bytes/);
    expectFormatError(() => parsePgm(ascii('P5\n2 1\n255')), /only 0 bytes/);
  });

  it('when the header stops early or a field is not a number, then the field is named', () => {
    expectFormatError(() => parsePgm(ascii('P5\n12')), /ends before its height/);
    expectFormatError(() => parsePgm(ascii('P5\n12 x4 255\n')), /height is not a whole number/);
    expectFormatError(() => parsePgm(ascii('P5\n12 -4 255\n')), /height is not a whole number/);
    expectFormatError(() => parsePgm(ascii('P5\n12 4 2.5\n')), /maximum grey value is not a whole number/);
  });

  it('when P2 data is short, non-numeric or above maxval, then the message says which value', () => {
    expectFormatError(() => parsePgm(ascii('P2 2 2 15\n1 2 3\n')), /holds only 3 grey values/);
    expectFormatError(() => parsePgm(ascii('P2 2 1 15\n1 x\n')), /Grey value number 2 is not a whole number/);
    expectFormatError(() => parsePgm(ascii('P2 2 1 15\n1 2.0\n')), /Grey value number 2 is not a whole number/);
    expectFormatError(() => parsePgm(ascii('P2 2 1 15\n1 16\n')), /column 1, row 0.*16, above the header's maximum of 15/);
  });

  it('when a short P2 file claims a huge size, then it is refused before memory for that size is taken', () => {
    // 10,000 × 10,000 values need at least 199,999,999 bytes of digits and separators.
    expectFormatError(() => parsePgm(ascii('P2 10000 10000 255\n0 0 0\n')), /10,000 × 10,000 pixels but the file's 7 bytes after the header cannot hold that many grey values/);
  });

  it('when a P5 sample exceeds maxval, then it is rejected with its position', () => {
    expectFormatError(() => parsePgm(withRaster('P5 2 2 100\n', [0, 0, 0, 101])), /column 1, row 1.*101/);
  });
});

describe('encodePgm', () => {
  const img8: PgmImage = { width: 3, height: 2, maxval: 255, pixels: Uint16Array.from([0, 128, 255, 205, 254, 1]) };
  const img16: PgmImage = { width: 2, height: 2, maxval: 65535, pixels: Uint16Array.from([0, 258, 65535, 4660]) };

  it('when writing P5 with maxval below 256, then the bytes are the header and one byte per pixel', () => {
    // Act
    const bytes = encodePgm(img8);

    // Assert: layout per netpbm.sourceforge.net/doc/pgm.html
    const header = 'P5\n3 2\n255\n';
    expect(new TextDecoder().decode(bytes.subarray(0, header.length))).toBe(header);
    expect(Array.from(bytes.subarray(header.length))).toEqual([0, 128, 255, 205, 254, 1]);
  });

  it('when writing P5 with a 16-bit maxval, then samples are big-endian pairs', () => {
    // Act
    const bytes = encodePgm(img16);

    // Assert: "The most significant byte is first" (netpbm.sourceforge.net/doc/pgm.html)
    const header = 'P5\n2 2\n65535\n';
    expect(Array.from(bytes.subarray(header.length))).toEqual([0, 0, 1, 2, 255, 255, 0x12, 0x34]);
  });

  it('when writing then reading P5 and P2, then the image comes back unchanged', () => {
    for (const img of [img8, img16]) {
      for (const format of ['P5', 'P2'] as const) {
        // Act
        const back = parsePgm(encodePgm(img, format));

        // Assert
        expect(back).toEqual(img);
      }
    }
  });

  it('when writing a wide P2 image, then no line is longer than 70 characters (Netpbm PGM spec: plain PGM lines)', () => {
    // Arrange: netpbm.sourceforge.net/doc/pgm.html — "No line should be longer than 70 characters."
    const img: PgmImage = { width: 100, height: 3, maxval: 65535, pixels: new Uint16Array(300).fill(65535) };

    // Act
    const text = new TextDecoder().decode(encodePgm(img, 'P2'));

    // Assert
    expect(Math.max(...text.split('\n').map((l) => l.length))).toBeLessThanOrEqual(70);
    expect(parsePgm(ascii(text))).toEqual(img);
  });

  it('when the image is inconsistent, then encoding refuses it', () => {
    expectFormatError(() => encodePgm({ width: 2, height: 2, maxval: 255, pixels: new Uint16Array(3) }), /holds 3 pixel values/);
    expectFormatError(() => encodePgm({ width: 1, height: 1, maxval: 10, pixels: Uint16Array.from([11]) }), /above the header's maximum/);
    expectFormatError(() => encodePgm({ width: 1, height: 1, maxval: 0, pixels: Uint16Array.from([0]) }), /between 1 and 65,535/);
  });
});
