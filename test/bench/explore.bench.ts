/**
 * A page update of the explore page as it runs in the page (budget 50 ms per change on this
 * machine): the settings applied to the parsed file, the loader, predict with its uncertainties,
 * the forecast's Fisher matrix and the redraw of every live part as HTML (the browser then lays
 * it out: test/explore/browser.test.ts prints the median of the updates it makes in chromium).
 * Each call changes the control's value, so that nothing is reused that a dragged slider would
 * not reuse. Per control: area, limit, alpha; and writing the YAML text of the settings.
 */
import type { BenchCase } from './run.js';
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { dirname } from 'node:path';
import { parseYaml } from '../../src/survey/yaml.js';
import { loadSurveyText } from '../../src/survey/load.js';
import { exploreControls, settingsObject, settingsText } from '../../src/library/explore/settings.js';
import { exploreCompute } from '../../src/library/explore/engine.js';
import { figuresHtml, fisherHtml, outputsHtml, slicesHtml, warningsHtml } from '../../src/render/explore/view.js';

function page(name: string) {
  const path = fileURLToPath(new URL(`../../samples/${name}`, import.meta.url));
  const text = readFileSync(path, 'utf8');
  const raw = parseYaml(text, name);
  const controls = exploreControls(raw, loadSurveyText(text, path));
  return { name, path, text, raw, controls, dir: dirname(path) };
}

const line = page('halpha-narrowband.yaml');
const deep = page('deep-continuum.yaml');
const interlopers = page('narrowband-interlopers.yaml');

let step = 0;
function update(p: ReturnType<typeof page>, key: string) {
  const c = p.controls.find((x) => x.key === key)!;
  return async () => {
    const f = (++step % 200) / 200;
    const v = c.scale === 'log' ? c.value * 10 ** (0.2 * f - 0.1) : c.value + 0.1 * (f - 0.5) * (c.max - c.min);
    const r = await exploreCompute(
      { text: '', object: settingsObject(p.raw, p.controls, new Map([[key, v]])) },
      p.name,
      p.dir,
    );
    return (
      outputsHtml(r).length +
      warningsHtml(r).length +
      slicesHtml(r).length +
      fisherHtml(r).length +
      figuresHtml(r).length
    );
  };
}

export const cases: BenchCase[] = [
  { name: 'explore page update: halpha-narrowband, area', run: update(line, 'area'), repeats: 30 },
  {
    name: 'explore page update: halpha-narrowband, detection.limit',
    run: update(line, 'detection.limit'),
    repeats: 30,
  },
  {
    name: 'explore page update: halpha-narrowband, population.alpha',
    run: update(line, 'population.alpha'),
    repeats: 30,
  },
  { name: 'explore page update: deep-continuum, area', run: update(deep, 'area'), repeats: 20 },
  { name: 'explore page update: deep-continuum, detection.limit', run: update(deep, 'detection.limit'), repeats: 20 },
  { name: 'explore page update: narrowband-interlopers, area', run: update(interlopers, 'area'), repeats: 20 },
  {
    name: 'explore: the settings written as YAML (halpha-narrowband)',
    run: () => settingsText(line.text, line.controls, new Map([['area', 1 + (++step % 100) / 100]])),
    repeats: 30,
  },
];
