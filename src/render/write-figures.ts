/**
 * Write figures to a directory: DIR/<name>.svg always, DIR/<name>.png when the rasteriser
 * (@resvg/resvg-js, a prebuilt native binary shipped inside its npm package) loads. PNG is
 * drawn with the fonts installed on the machine; nothing is fetched. Each file is written to a
 * temporary name first and renamed into place, so a reader never sees half a figure.
 */
import { mkdir, rename, rm, writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import type { Figure } from './types.js';

export interface WriteFiguresOptions {
  /** Also write PNG (default true); skipped with a note when the rasteriser is missing. */
  png?: boolean;
  /** PNG scale relative to the SVG size (default 2, for print). */
  pngScale?: number;
}

export interface WriteFiguresResult {
  /** Paths written, in order. */
  files: string[];
  /** Why PNG was not written, when it was asked for and could not be. */
  pngSkipped?: string;
}

/** The part of @resvg/resvg-js used here (declared locally: the package is optional). */
interface ResvgModule {
  Resvg: new (
    svg: string,
    options?: {
      fitTo?: { mode: 'zoom'; value: number };
      background?: string;
      font?: { loadSystemFonts?: boolean; defaultFontFamily?: string };
    },
  ) => { render(): { asPng(): Uint8Array } };
}
const RASTERISER = '@resvg/resvg-js';
let resvg: Promise<ResvgModule | Error> | undefined;

/** Load the rasteriser once; an Error (not a throw) when it is not installed or will not load. */
export function loadRasteriser(): Promise<ResvgModule | Error> {
  resvg ??= (import(RASTERISER) as Promise<ResvgModule & { default?: ResvgModule }>).then(
    // a CommonJS package: named export when Node detects it, else on the default export
    (m) => (typeof m.Resvg === 'function' ? m : m.default!),
    (e: unknown) =>
      new Error(
        `PNG not written: the rasteriser @resvg/resvg-js did not load (${e instanceof Error ? e.message : String(e)})`,
      ),
  );
  return resvg;
}

/** Draw one SVG to PNG bytes at `scale` times its size, with system fonts only. */
export async function svgToPng(svg: string, scale = 2): Promise<Uint8Array> {
  const m = await loadRasteriser();
  if (m instanceof Error) throw m;
  const r = new m.Resvg(svg, {
    fitTo: { mode: 'zoom', value: scale },
    background: 'white',
    font: { loadSystemFonts: true, defaultFontFamily: 'DejaVu Sans' },
  });
  return r.render().asPng();
}

/** A name safe as a file name: letters, digits, '-', '_' only. */
export function safeFigureName(name: string): string {
  const s = name.replace(/[^A-Za-z0-9_-]+/g, '-').replace(/^-+|-+$/g, '');
  return s || 'figure';
}

async function writeAtomic(path: string, data: string | Uint8Array): Promise<void> {
  const tmp = `${path}.tmp-${process.pid}-${Date.now()}`;
  try {
    await writeFile(tmp, data);
    await rename(tmp, path);
  } catch (e) {
    // never leave the temporary file behind
    await rm(tmp, { force: true });
    throw e;
  }
}

export async function writeFigures(
  dir: string,
  figures: Figure[],
  options: WriteFiguresOptions = {},
): Promise<WriteFiguresResult> {
  await mkdir(dir, { recursive: true });
  const files: string[] = [];
  const wantPng = options.png ?? true;
  let pngSkipped: string | undefined;
  const raster = wantPng ? await loadRasteriser() : undefined;
  if (raster instanceof Error) pngSkipped = raster.message;
  for (const f of figures) {
    const base = join(dir, safeFigureName(f.name));
    await writeAtomic(`${base}.svg`, f.svg);
    files.push(`${base}.svg`);
    if (wantPng && !(raster instanceof Error)) {
      await writeAtomic(`${base}.png`, await svgToPng(f.svg, options.pngScale ?? 2));
      files.push(`${base}.png`);
    }
  }
  return pngSkipped ? { files, pngSkipped } : { files };
}
