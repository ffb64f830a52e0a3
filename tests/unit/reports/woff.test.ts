/** WOFF 1.0 unpacking: the TrueType font comes out whole (same tables, same sizes as declared). */
import fs from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { woffToSfnt } from '../../../src/lib/server/pdf/woff';

const file = path.resolve('node_modules/@fontsource/noto-sans/files/noto-sans-latin-400-normal.woff');

describe('woffToSfnt', () => {
  it('rebuilds the sfnt with every table at its declared length', () => {
    const woff = fs.readFileSync(file);
    const sfnt = woffToSfnt(woff);
    // W3C WOFF 1.0, 4: totalSfntSize is the size of the uncompressed font.
    expect(sfnt.length).toBe(woff.readUInt32BE(16));
    expect(sfnt.readUInt32BE(0)).toBe(woff.readUInt32BE(4));
    const numTables = sfnt.readUInt16BE(4);
    expect(numTables).toBe(woff.readUInt16BE(12));
    const tags = Array.from({ length: numTables }, (_, i) =>
      sfnt.subarray(12 + i * 16, 16 + i * 16).toString('latin1'),
    );
    expect(tags).toContain('glyf');
    expect(tags).toContain('cmap');
  });

  it('refuses a file that is not WOFF', () => {
    expect(() => woffToSfnt(Buffer.from('not a font at all, really not'))).toThrow(/not a WOFF/);
  });
});
