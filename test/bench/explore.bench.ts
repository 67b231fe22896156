/**
 * A page update of the explore page as it runs in the page (budget 50 ms per change on this
 * machine): the settings applied to the parsed file, the loader, predict with its uncertainties,
 * the forecast's Fisher matrix and the redraw of every live part as HTML (the browser then lays
 * it out: test/bench/explore-browser.ts times the same updates in chromium). Every bundled sample
 * and every control the page gives it (the exposure per pointing of a plan file sets the area and
 * the limit, as the page does). Each call changes the control's value, so that nothing is reused
 * that a dragged slider would not reuse. `npm run bench explore` (filter by sample name:
 * `npm run bench deep-continuum`); and writing the YAML text of the settings.
 */
import type { BenchCase } from './run.js';
import { readFileSync, readdirSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { dirname, join } from 'node:path';
import { parseYaml } from '../../src/survey/yaml.js';
import { loadSurveyText } from '../../src/survey/load.js';
import {
  exploreControls,
  controlSettings,
  settingsObject,
  settingsText,
  type ControlSpec,
} from '../../src/library/explore/settings.js';
import { exploreCompute, exploreMemo } from '../../src/library/explore/engine.js';
import { figuresHtml, fisherHtml, outputsHtml, slicesHtml, warningsHtml } from '../../src/render/explore/view.js';

const SAMPLES_DIR = fileURLToPath(new URL('../../samples/', import.meta.url));

function page(name: string) {
  const path = join(SAMPLES_DIR, name);
  const text = readFileSync(path, 'utf8');
  const raw = parseYaml(text, name);
  const controls = exploreControls(raw, loadSurveyText(text, path));
  // what the page keeps from one update to the next
  return { name, path, text, raw, controls, dir: dirname(path), keep: exploreMemo() };
}

type Page = ReturnType<typeof page>;

let step = 0;
/** The control's value moved within its range to a new place on every call. */
function moved(c: ControlSpec): number {
  const f = (++step % 200) / 200;
  return c.scale === 'log' ? c.value * 10 ** (0.2 * f - 0.1) : c.value + 0.1 * (f - 0.5) * (c.max - c.min);
}

/** What the page sets for one control at `v` (the exposure sets the area and the limit). */
function settings(c: ControlSpec, v: number): Map<string, number> {
  return new Map(controlSettings(c, c.plan ? Math.min(c.max, Math.max(c.min, v)) : v));
}

/** One page update after moving `c` (what src/explore/browser/main.ts does on an input event). */
export async function pageUpdate(p: Page, c: ControlSpec): Promise<number> {
  const r = await exploreCompute(
    { text: '', object: settingsObject(p.raw, p.controls, settings(c, moved(c))) },
    p.name,
    p.dir,
    p.keep,
  );
  return (
    outputsHtml(r).length + warningsHtml(r).length + slicesHtml(r).length + fisherHtml(r).length + figuresHtml(r).length
  );
}

export const SAMPLE_FILES = readdirSync(SAMPLES_DIR)
  .filter((f) => f.endsWith('.yaml'))
  .sort();

const pages = SAMPLE_FILES.map(page);
const line = pages.find((p) => p.name === 'halpha-narrowband.yaml')!;

export const cases: BenchCase[] = [
  ...pages.flatMap((p) =>
    p.controls.map((c) => ({
      name: `explore page update: ${p.name.replace('.yaml', '')}, ${c.key}`,
      run: () => pageUpdate(p, c),
      repeats: 15,
    })),
  ),
  {
    name: 'explore: the settings written as YAML (halpha-narrowband)',
    run: () => settingsText(line.text, line.controls, new Map([['area', 1 + (++step % 100) / 100]])),
    repeats: 30,
  },
];
