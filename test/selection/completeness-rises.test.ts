/**
 * completeness_rises_to_faint: a completeness table more complete at its faintest row than at its
 * brightest (by 0.2 or more). A completeness falls toward faint sources (docs/survey-file.md,
 * "Completeness"; common practice: fainter injected sources are recovered less often), so such a
 * table most likely lists its fractions in the reverse order of its fluxes or magnitudes. Found by
 * a trial user: [[2.5e-17, 1.0], ..., [1.5e-16, 0.35]] for a line search was counted without a
 * word. The file is still counted as written (a warning, not a refusal: a measured table may wander
 * a little); a table that falls, a small rise, the logistic model and the threshold kind raise
 * nothing, and no bundled sample raises it.
 */
import { describe, expect, test } from 'vitest';
import { readdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { parse, stringify } from 'yaml';
import { loadSurveyFile, parseSurveyObject } from '../../src/survey/load.js';
import { predictionWarnings } from '../../src/counts/warnings.js';
import { clone, LINE_YAML, MAGNITUDE_YAML, setPath } from '../survey/fixtures.js';
import { runCli } from '../cli/helpers.js';
import { tempDir } from '../support/temp.js';

const FILE = 'completeness-rises.yaml';
const CODE = 'completeness_rises_to_faint';

function survey(base: string, keys: Record<string, unknown>) {
  const obj = clone(parse(base) as Record<string, unknown>);
  for (const [k, v] of Object.entries(keys)) setPath(obj, k, v);
  return parseSurveyObject(obj, FILE);
}
const codes = (s: ReturnType<typeof survey>) => predictionWarnings(s).map((w) => w.code);
const table = (rows: number[][]) => ({ 'detection.completeness': { model: 'table', table: rows } });

describe('a completeness table that rises toward faint sources', () => {
  test('line flux: fractions beside the wrong fluxes warn, naming both ends and what to check', () => {
    const s = survey(
      LINE_YAML,
      table([
        [2.5e-17, 1.0],
        [5e-17, 0.85],
        [1.5e-16, 0.35],
      ]),
    );
    const w = predictionWarnings(s).find((x) => x.code === CODE)!;
    expect(w.message).toContain(
      'is 1 at its faintest row (2.5e-17 erg/s/cm^2) and 0.35 at its brightest (1.5e-16 erg/s/cm^2)',
    );
    expect(w.message).toContain('rows run from the faintest flux up');
    // the same rows in the right order: nothing
    expect(
      codes(
        survey(
          LINE_YAML,
          table([
            [2.5e-17, 0.35],
            [5e-17, 0.85],
            [1.5e-16, 1.0],
          ]),
        ),
      ),
    ).not.toContain(CODE);
  });

  test('magnitude: a table falling toward bright magnitudes warns; one falling toward faint ones does not', () => {
    const rising = survey(
      MAGNITUDE_YAML,
      table([
        [26, 0.3],
        [27, 0.6],
        [28, 0.95],
      ]),
    );
    const w = predictionWarnings(rising).find((x) => x.code === CODE)!;
    expect(w.message).toContain('is 0.95 at its faintest row (28 AB) and 0.3 at its brightest (26 AB)');
    expect(w.message).toContain('rows run from the brightest magnitude down');
    const falling = table([
      [26, 0.95],
      [27, 0.6],
      [28, 0.3],
    ]);
    expect(codes(survey(MAGNITUDE_YAML, falling))).not.toContain(CODE);
  });

  test('a small rise (under 0.2 between the ends), a bump inside, and the logistic model raise nothing', () => {
    const small = table([
      [26, 0.85],
      [27, 0.98],
      [28, 0.95],
    ]);
    expect(codes(survey(MAGNITUDE_YAML, small))).not.toContain(CODE);
    const bump = table([
      [26, 0.9],
      [26.5, 1.0],
      [28, 0.2],
    ]);
    expect(codes(survey(MAGNITUDE_YAML, bump))).not.toContain(CODE);
    expect(codes(survey(MAGNITUDE_YAML, {}))).not.toContain(CODE);
  });

  test('the command line says it on stderr and still counts the file (exit 0)', async () => {
    const obj = clone(parse(LINE_YAML) as Record<string, unknown>);
    setPath(obj, 'detection.completeness', {
      model: 'table',
      table: [
        [2.5e-17, 1.0],
        [1.5e-16, 0.35],
      ],
    });
    const file = join(tempDir('skytally-completeness-rises-'), FILE);
    writeFileSync(file, stringify(obj));
    const r = await runCli(['predict', file, '--format', 'json']);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).toContain('skytally: warning: detection.completeness.table is 1 at its faintest row');
    expect(JSON.parse(r.stdout).warnings.map((w: { code: string }) => w.code)).toContain(CODE);
  });

  test('no bundled sample raises it', () => {
    const dir = fileURLToPath(new URL('../../samples/', import.meta.url));
    for (const f of readdirSync(dir).filter((n) => n.endsWith('.yaml')))
      expect(codes(loadSurveyFile(join(dir, f)))).not.toContain(CODE);
  });
});
