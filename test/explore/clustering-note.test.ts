/**
 * The explore page states what its cosmic variance assumed, under the slice table: sigma8 and n_s
 * of the power spectrum, the total's bias (with the halo mass abundance matching gave it), the
 * matter's sigma and the box's effective depth, the same numbers `predict` gives in its JSON
 * (docs/outputs.md, explore; predict's uncertainty block) at the significant figures shown.
 */
import { readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, test } from 'vitest';
import { exploreCompute } from '../../src/library/explore/engine.js';
import { slicesHtml } from '../../src/render/explore/view.js';
import { loadSurveyText } from '../../src/survey/load.js';
import { predict } from '../../src/counts/predict.js';
import { sig } from '../../src/render/format.js';

const SAMPLES = fileURLToPath(new URL('../../samples/', import.meta.url));

describe('the cosmic variance assumed, on the explore page', () => {
  test.each(['dropout-field.yaml', 'halpha-narrowband.yaml'])(
    '%s: sigma8, n_s, bias, sigma of the matter and depth as predict gives them',
    async (name) => {
      const path = join(SAMPLES, name);
      const text = readFileSync(path, 'utf8');
      const r = await exploreCompute({ text }, path, dirname(path));
      const p = predict(loadSurveyText(text, path));
      const u = p.totals.uncertainty!;
      const html = slicesHtml(r);
      expect(html).toContain('data-part="cosmic-variance-assumed"');
      expect(html).toContain(`sigma8 = ${sig(p.cosmology.sigma8!, 4)}, n_s = ${sig(p.cosmology.n_s!, 4)}`);
      expect(html).toContain(`bias ${sig(u.bias, 3)} (count-weighted`);
      expect(html).toContain(`haloes above ${sig(u.halo_mass_min_msun!, 3)} Msun`);
      expect(html).toContain(
        `sigma of the matter ${sig(u.sigma_matter, 3)}, effective depth ${sig(u.effective_depth_mpc!, 3)} Mpc`,
      );
    },
  );
  test('without cosmic variance there is no such sentence', () => {
    const html = slicesHtml({ text: '', title: '', outputs: [], rows: [], counts: [], lf: [], warnings: [] });
    expect(html).not.toContain('cosmic-variance-assumed');
  });
});
