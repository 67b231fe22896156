/** Figures as the files `--figures DIR` writes (rendered in memory; src/cli/io.ts Outputs writes them). */
import type { CliIO, FigureFile } from './io.js';
import type { Figure } from '../render/types.js';
import { printable } from '../errors.js';

/**
 * Every figure as the files --figures writes: <name>.svg, and <name>.png when `png` (false with
 * --no-png) and the rasteriser (@resvg/resvg-js) loads (a note on stderr when it does not).
 * Rendered in memory: nothing is written until every output of the command is ready
 * (src/cli/io.ts Outputs).
 */
export async function figureFiles(io: CliIO, figures: Figure[], png = true): Promise<FigureFile[]> {
  const { loadRasteriser, safeFigureName, svgToPng } = await import('../render/write-figures.js');
  const raster = png ? await loadRasteriser() : undefined;
  if (raster instanceof Error) io.stderr(`skytally: ${printable(raster.message)}; SVG only.\n`);
  const files: FigureFile[] = [];
  for (const f of figures) {
    const base = safeFigureName(f.name);
    files.push({ name: `${base}.svg`, data: f.svg });
    if (raster !== undefined && !(raster instanceof Error))
      files.push({ name: `${base}.png`, data: await svgToPng(f.svg, 2) });
  }
  return files;
}
