import fs from 'node:fs';
import { createRequire } from 'node:module';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { woffToTrueType } from '../pdf-font.ts';

const require = createRequire(import.meta.url);
const fontkit = require('fontkit') as { create(buffer: Buffer): { numGlyphs: number; familyName: string; layout(text: string): { glyphs: { id: number }[] } } };
const woffFile = path.resolve('node_modules/@fontsource/roboto-flex/files/roboto-flex-latin-400-normal.woff');

describe('the PDF font, unpacked from WOFF to TrueType', () => {
  it('is the same font: same family, same glyphs for the text of an invoice', () => {
    const woff = fs.readFileSync(woffFile);
    const ttf = woffToTrueType(woff);
    expect(ttf.readUInt32BE(0)).toBe(woff.readUInt32BE(4));
    const a = fontkit.create(woff);
    const b = fontkit.create(ttf);
    expect(b.familyName).toBe(a.familyName);
    expect(b.numGlyphs).toBe(a.numGlyphs);
    const text = 'F-07, 12–26 Nov, 14 days · €27.96';
    expect(b.layout(text).glyphs.map((g) => g.id)).toEqual(a.layout(text).glyphs.map((g) => g.id));
  });

  it('refuses what is not a WOFF 1.0 file', () => {
    expect(() => woffToTrueType(Buffer.from('not a font at all, just text'))).toThrow(/WOFF/);
  });
});
