import { readdirSync, readFileSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, test } from 'vitest';
import { buildFigures } from '../../src/render/figures.js';
import { loadRasteriser, safeFigureName, writeFigures } from '../../src/render/write-figures.js';
import { demoPlan, demoPrediction } from './demo.js';
import { tempDir } from '../support/temp.js';

const root = tempDir('skytally-figures-');
afterAll(() => rmSync(root, { recursive: true, force: true }));

/** Width and height from a PNG's IHDR chunk (PNG specification, ISO/IEC 15948, section 11.2.2). */
function pngSize(buf: Buffer): [number, number] {
  expect([...buf.subarray(0, 8)]).toEqual([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);
  expect(buf.subarray(12, 16).toString('latin1')).toBe('IHDR');
  return [buf.readUInt32BE(16), buf.readUInt32BE(20)];
}

describe('writeFigures', () => {
  test('writes DIR/<name>.svg for every figure (creating DIR), byte for byte', async () => {
    const figs = await buildFigures({ prediction: demoPrediction({ slices: 3 }), plan: demoPlan() });
    const dir = join(root, 'a', 'b');
    const r = await writeFigures(dir, figs, { png: false });
    expect(r.files).toEqual(figs.map((f) => join(dir, `${f.name}.svg`)));
    for (const f of figs) expect(readFileSync(join(dir, `${f.name}.svg`), 'utf8')).toBe(f.svg);
    expect(readdirSync(dir).filter((n) => n.includes('.tmp-'))).toEqual([]);
  });

  test('PNG beside each SVG at twice its size, when the rasteriser loads (else the reason is given)', async () => {
    const figs = await buildFigures({ prediction: demoPrediction({ slices: 2 }) });
    const dir = join(root, 'png');
    const r = await writeFigures(dir, figs);
    const raster = await loadRasteriser();
    if (raster instanceof Error) {
      expect(r.pngSkipped).toMatch(/PNG not written/);
      return;
    }
    expect(r.pngSkipped).toBeUndefined();
    for (const f of figs) {
      const [w, h] = pngSize(readFileSync(join(dir, `${f.name}.png`)));
      const m = /<svg[^>]* width="(\d+)" height="(\d+)"/.exec(f.svg)!;
      expect([w, h]).toEqual([2 * Number(m[1]), 2 * Number(m[2])]);
    }
  });

  test.each([
    ['counts', 'counts'],
    ['../../etc/passwd', 'etc-passwd'],
    ['a b/c', 'a-b-c'],
    ['', 'figure'],
  ])('safe file name %j -> %j', (a, b) => expect(safeFigureName(a)).toBe(b));
});
