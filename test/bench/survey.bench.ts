/** Survey loading and expression evaluation (figures to report, no assertions). */
import type { BenchCase } from './run.js';
import { loadSurveyText } from '../../src/survey/index.js';
import { compileExpression } from '../../src/survey/expressions.js';
import { LINE_YAML, MAGNITUDE_YAML, THRESHOLD_YAML } from '../survey/fixtures.js';

/** The largest survey file the key cap allows (19,000 keys): the repeated-key check is one linear pass. */
const MANY_KEYS = `${LINE_YAML}extra: {${Array.from({ length: 19_000 }, (_, i) => `${i.toString(36)}: 0`).join(', ')}}\n`;

const expr = compileExpression('1e-3 * (1 + z)^2.7 / (1 + ((1 + z)/2.9)^5.6)', 'bench', 'k').fn;

export const cases: BenchCase[] = [
  { name: 'loadSurveyText line_flux (units, expression, filter)', run: () => loadSurveyText(LINE_YAML, 'bench.yaml') },
  {
    name: 'loadSurveyText magnitude (preset, table, width slices)',
    run: () => loadSurveyText(MAGNITUDE_YAML, 'bench.yaml'),
  },
  {
    name: 'loadSurveyText threshold (two populations, edges)',
    run: () => loadSurveyText(THRESHOLD_YAML, 'bench.yaml'),
  },
  {
    name: 'loadSurveyText refusing 19,000 keys (an unknown key), after the repeated-key check',
    run: () => {
      try {
        loadSurveyText(MANY_KEYS, 'bench.yaml');
      } catch {
        /* refused: unknown key "extra" */
      }
    },
    repeats: 5,
  },
  {
    name: 'compiled expression (Madau-Dickinson form) x 1e6 evaluations',
    run: () => {
      let s = 0;
      for (let i = 0; i < 1e6; i++) s += expr((i % 1000) * 0.008);
      return s;
    },
    repeats: 10,
  },
];
