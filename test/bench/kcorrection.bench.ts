/**
 * K-corrections by synthetic photometry (src/selection/kcorrection.ts): one exact K(z), the adaptive
 * table a population's window needs (built afresh each run: a new spectrum object defeats the cache),
 * and a predict of the reference surveys that use a spectrum (its table kept between runs).
 */
import { fileURLToPath } from 'node:url';
import { loadSurveyFile } from '../../src/survey/load.js';
import { predict } from '../../src/counts/predict.js';
import { kCorrectionFunction, sedKCorrection, tabulatedSpectrum } from '../../src/selection/kcorrection.js';
import type { RestFrame } from '../../src/model/photometry.js';
import type { BenchCase } from './run.js';

const dir = fileURLToPath(new URL('../reference/surveys-selection/', import.meta.url));
const surveys = ['vega-restband-sed.yaml', 'dropout-sed-selection.yaml'].map((f) => loadSurveyFile(`${dir}${f}`));
let sink = 0;

function parts(i: number) {
  const s = surveys[i]!;
  const d = s.detection;
  if (d.kind !== 'magnitude' || !d.sed) throw new Error('a survey with detection.sed expected');
  const p = s.populations[0]!;
  const rest: RestFrame = p.restBand
    ? { kind: 'band', band: p.restBand }
    : { kind: 'wavelength', angstrom: p.restWavelengthAngstrom };
  return { sed: d.sed, igm: d.igm, rest, window: p.window };
}

export const cases: BenchCase[] = [
  ...[0, 1].flatMap((i): BenchCase[] => {
    const { sed, igm, rest, window } = parts(i);
    const label = i === 0 ? 'band file, rest band' : 'gaussian band, rest 1500 A';
    const exact = kCorrectionFunction(tabulatedSpectrum(sed.spectrum), sed.band, rest, igm);
    return [
      {
        name: `K(z) exact, ${label}, 100 calls`,
        run: () => {
          let a = 0;
          for (let k = 0; k < 100; k++) a += exact(window.min + ((window.max - window.min) * k) / 100);
          sink += a;
          return a;
        },
      },
      {
        name: `K(z) table over the window, ${label}`,
        run: () => {
          const t = sedKCorrection({ ...sed }, rest, igm, window.min, window.max);
          sink += t(window.min);
          return sink;
        },
      },
    ];
  }),
  ...surveys.map((s, i): BenchCase => ({
    name: `predict ${i === 0 ? 'vega-restband-sed' : 'dropout-sed-selection'} (K table kept)`,
    run: () => {
      const p = predict(s);
      sink += p.totals.count;
      return sink;
    },
  })),
];
