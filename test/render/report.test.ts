import { readFileSync } from 'node:fs';
import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import { buildFigures, countsFigure } from '../../src/render/figures.js';
import { assertSafeSvg, escapeHtml, renderReport, svgForHtml } from '../../src/render/report.js';
import { formatNumber, formatWritten, groupThousands } from '../../src/render/format.js';
import type { Figure, PredictionView } from '../../src/render/types.js';
import { loadSurveyFile } from '../../src/survey/load.js';
import { predict } from '../../src/counts/predict.js';
import { demoForecast, demoPlan, demoPrediction } from './demo.js';
import { unescapeHtml } from '../support/html.js';

const NASTY_1 = '<script>alert(1)</script>';
const NASTY_2 = '"><img src=x onerror=alert(1)>';

const SURVEY_TEXT = `format: 1
title: "${NASTY_1} ${NASTY_2.replace(/"/g, '\\"')}"
area: 2.5
redshift: {min: 0.8, max: 1.6}
# a comment with </pre> and <b>bold</b> & an ampersand
`;

describe('escapeHtml', () => {
  test('the five characters special in HTML text and attributes are replaced (HTML Living Standard, 13.1.2.6)', () => {
    expect(escapeHtml(`<a href="x" title='y'>&</a>`)).toBe(
      '&lt;a href=&quot;x&quot; title=&#39;y&#39;&gt;&amp;&lt;/a&gt;',
    );
    expect(escapeHtml(NASTY_1)).toBe('&lt;script&gt;alert(1)&lt;/script&gt;');
    expect(escapeHtml(NASTY_2)).toBe('&quot;&gt;&lt;img src=x onerror=alert(1)&gt;');
    expect(escapeHtml(42)).toBe('42');
  });

  test('property: output never holds < > " \' or a bare &, and unescapes to the input', () => {
    fc.assert(
      fc.property(fc.string({ unit: 'binary' }), (s) => {
        const e = escapeHtml(s);
        expect(/[<>"']/.test(e)).toBe(false);
        expect(/&(?!(amp|lt|gt|quot|#39);)/.test(e)).toBe(false);
        expect(unescapeHtml(e)).toBe(s);
      }),
    );
  });
});

describe('formatNumber', () => {
  test.each([
    [0, '0'],
    [3908.23, '3,908'],
    [123.456, '123.5'],
    [0.0123456, '0.01235'],
    [2.5e-4, '2.5 × 10<sup>-4</sup>'],
    [1.23456e8, '1.235 × 10<sup>8</sup>'],
    [-1.5, '-1.5'],
  ])('%s -> %s', (x, s) => expect(formatNumber(x)).toBe(s));
});

describe('formatWritten: a number of the model table as the file wrote it', () => {
  /** The number a reader reads back from the text (commas dropped, m × 10^e as m e e). */
  const readBack = (t: string) => Number(t.replace(/,/g, '').replace(/ × 10<sup>(-?\d+)<\/sup>$/, 'e$1'));

  test.each([
    [6562.8, '6,562.8'],
    [1215.67, '1,215.67'],
    [1500, '1,500'],
    [-20123.25, '-20,123.25'],
    [1.23456789e42, '1.23456789 × 10<sup>42</sup>'],
    [-3.4622156886994633, '-3.46222'],
    [2.5e-4, '2.5 × 10<sup>-4</sup>'],
    [0, '0'],
  ])('%s -> %s', (x, t) => expect(formatWritten(x)).toBe(t));

  test('property: every finite double of 1,000 or more (either sign) reads back as itself (round trip, exact)', () => {
    fc.assert(
      fc.property(fc.double({ min: 1000, noNaN: true, noDefaultInfinity: true }), fc.boolean(), (x, neg) => {
        const v = neg ? -x : x;
        expect(readBack(formatWritten(v))).toBe(v);
      }),
      { numRuns: 3000 },
    );
  });

  test('property: below 1,000 as formatNumber(x, 6); from 1,000 up, a number of at most six significant digits as formatNumber(x, 6) but for the fraction it rounded away below 1e7', () => {
    fc.assert(
      fc.property(fc.double({ min: -999.9999999, max: 999.9999999, noNaN: true }), (x) => {
        expect(formatWritten(x)).toBe(formatNumber(x, 6));
      }),
      { numRuns: 3000 },
    );
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 999_999 }), fc.integer({ min: -2, max: 30 }), fc.boolean(), (m, e, neg) => {
        const x = Number(`${neg ? '-' : ''}${m}e${e}`);
        if (Math.abs(x) < 1000) return;
        const rounded = Math.abs(x) < 1e7 && !Number.isInteger(x);
        if (rounded) expect(formatNumber(x, 6)).toBe(groupThousands(Math.round(x)));
        else expect(formatWritten(x)).toBe(formatNumber(x, 6));
      }),
      { numRuns: 3000 },
    );
  });
});

describe('assertSafeSvg', () => {
  test.each([
    ['<svg><script>alert(1)</script></svg>', /script/],
    ['<svg><g onload="alert(1)"></g></svg>', /event-handler/],
    ['<svg><image href="http://x/y.png"/></svg>', /image/],
    ['<svg></svg><script>alert(1)</script><svg></svg>', /more than once/],
    ['<svg><foreignObject><div/></foreignObject></svg>', /foreignobject/i],
    ['<svg><rect style="fill:url(http://x/y)"/></svg>', /URL/],
    ['<div></div>', /start with <svg/],
    ['<svg><g xlink:href="http://x/"><path d="M0,0"/></g></svg>', /link attribute \(xlink:href\)/],
    ['<svg><path clip-path=\'url( "http://x/y")\'/></svg>', /URL in clip-path/],
    ['<svg><g FILL=javascript:alert(1)></g></svg>', /URL in fill/],
    ['<svg><g stroke="expression(alert(1))"></g></svg>', /URL in stroke/],
  ])('refuses %s', (svg, why) => expect(() => assertSafeSvg(svg)).toThrow(why));

  test('accepts references inside the figure and URLs outside paint attributes', () => {
    // (common practice: url(#id) is a local reference; text may mention url() without painting with it)
    expect(() =>
      assertSafeSvg(`<svg><path fill="url(#g1)" clip-path='url("#clip2")' aria-label="url(http://x/)"/></svg>`),
    ).not.toThrow();
  });

  test('accepts what vega draws, also for a hostile title', async () => {
    const fig = (await countsFigure(demoPrediction({ slices: 3, title: `${NASTY_1} ${NASTY_2} </svg>` })))!;
    expect(() => assertSafeSvg(fig.svg)).not.toThrow();
  });
});

describe('renderReport', () => {
  const prediction = demoPrediction({ title: `Field ${NASTY_1} ${NASTY_2}` });
  const forecast = demoForecast({ mocks: 40 });
  const plan = demoPlan();
  let figures: Figure[] = [];
  const html = async () => {
    if (figures.length === 0) figures = await buildFigures({ prediction, forecast, plan });
    return renderReport({
      surveyText: SURVEY_TEXT,
      surveyTitle: prediction.title,
      surveyFile: 'demo<1>.yaml',
      prediction,
      forecast,
      plan,
      figures,
    });
  };

  test('user text appears only escaped: titles, survey text, file name, model keys and expressions', async () => {
    const doc = await html();
    expect(doc).not.toContain(NASTY_1);
    expect(doc).not.toContain('<img');
    expect(doc).toContain(escapeHtml(SURVEY_TEXT));
    expect(doc).toContain(
      '<title>Field &lt;script&gt;alert(1)&lt;/script&gt; &quot;&gt;&lt;img src=x onerror=alert(1)&gt;</title>',
    );
    expect(doc).toContain('demo&lt;1&gt;.yaml');
    expect(doc).toContain('<code>42.4 + 0.3*(z - 0.8)</code>');
    // the only <script or <img would be ours: there are none
    expect(doc.match(/<script/gi)).toBeNull();
  });

  test('hostile model keys and values are escaped too', () => {
    const doc = renderReport({
      surveyText: '',
      surveyTitle: 't',
      prediction: demoPrediction({ slices: 2 }),
      model: { name: NASTY_1, [NASTY_2]: NASTY_1, alpha: { table: [[0.5, NASTY_2 as unknown as number]] } },
      figures: [],
    });
    expect(doc).not.toContain(NASTY_1);
    expect(doc).not.toContain(NASTY_2);
  });

  test('self-contained: no URL, no script, no external reference of any kind', async () => {
    const doc = await html();
    expect(doc).not.toMatch(/:\/\//); // no http://, https://, file://
    // attribute names of every real tag (quoted values blanked: escaped user text may say "src=")
    const attrs = [...doc.matchAll(/<[A-Za-z][^>]*>/g)].flatMap((m) =>
      [...m[0].replace(/"[^"]*"|'[^']*'/g, '""').matchAll(/\s([^\s=>]+)\s*=/g)].map((a) => a[1]!.toLowerCase()),
    );
    expect(attrs.length).toBeGreaterThan(100);
    expect(attrs.filter((a) => /^(src|href|xlink:href|action|srcset|formaction|poster|data)$|^on/.test(a))).toEqual([]);
    expect(doc).not.toMatch(/@import|@font-face|url\(\s*(?!#)/i);
    expect(doc).toContain("default-src 'none'");
  });

  test('the predict table holds every slice count, its cumulative sum and +-1 sigma', async () => {
    const doc = await html();
    const table = doc.slice(
      doc.indexOf('id="predict-table"'),
      doc.indexOf('</table>', doc.indexOf('id="predict-table"')),
    );
    const rows = [...table.matchAll(/<tr><td>(\d+)<\/td>(.*?)<\/tr>/g)];
    expect(rows).toHaveLength(prediction.slices.length);
    let cum = 0;
    rows.forEach((r, i) => {
      const s = prediction.slices[i]!;
      cum += s.count;
      const cells = [...r[2]!.matchAll(/<td>(.*?)<\/td>/g)].map((m) => m[1]);
      expect(cells[3]).toBe(formatNumber(s.count));
      expect(cells[5]).toBe(formatNumber(cum));
      expect(cells[6]).toBe(`± ${formatNumber(s.count * s.uncertainty!.total_fraction, 3)}`);
      expect(cells[0]).toBe(`${s.z_min.toFixed(2)}–${s.z_max.toFixed(2)}`);
    });
    // the last cumulative equals the total (the slices sum to the total)
    expect(formatNumber(cum)).toBe(formatNumber(prediction.totals.count));
  });

  test("the headline's ± says what it holds (Poisson and cosmic variance, not the model's own spread; docs/outputs.md, uncertainty)", async () => {
    const doc = await html();
    const t = prediction.totals;
    expect(doc).toContain(
      `Expected count: <strong>${formatNumber(t.count)}</strong> ± ${formatNumber(t.count * t.uncertainty!.total_fraction, 3)} (1σ, Poisson and cosmic variance)`,
    );
  });

  test('what the cosmic variance rests on is stated: sigma8, Omega_b, n_s beside the cosmology, and the bias, sigma of the matter and box depth under the slices, as predict gives them (docs/outputs.md, uncertainty)', () => {
    const survey = loadSurveyFile(new URL('../../samples/dropout-field.yaml', import.meta.url).pathname);
    const p = predict(survey) as unknown as PredictionView;
    const doc = renderReport({ surveyText: '', surveyTitle: p.title, prediction: p, figures: [] });
    const c = p.cosmology!;
    const u = p.totals.uncertainty!;
    expect(doc).toContain(
      `σ₈ = ${formatNumber(c.sigma8 as number)}, Ω_b = ${formatNumber(c.omega_b as number)}, n_s = ${formatNumber(c.n_s as number)}</p>`,
    );
    const note = /<p class="note" id="cosmic-variance-assumed">([^<]*(?:<sup>[^<]*<\/sup>[^<]*)*)<\/p>/.exec(doc)?.[1];
    expect(note).toBeDefined();
    expect(note).toContain(`galaxy bias ${formatNumber(u.bias, 3)} (count-weighted`);
    expect(note).toContain(`σ of the matter ${formatNumber(u.sigma_matter, 3)}`);
    expect(note).toContain(`effective depth ${formatNumber(u.effective_depth_mpc!, 3)} Mpc`);
    // without cosmic variance there is nothing to state
    const demo = demoPrediction({ uncertainty: false });
    const bare = { ...demo, totals: { ...demo.totals, uncertainty: undefined } };
    expect(renderReport({ surveyText: '', surveyTitle: 'x', prediction: bare, figures: [] })).not.toContain(
      'cosmic-variance-assumed',
    );
  });

  test('the model is stated prominently, with the warning sentence', async () => {
    const doc = await html();
    const model = doc.indexOf('id="model"');
    expect(model).toBeGreaterThan(0);
    expect(model).toBeLessThan(doc.indexOf('id="predict"'));
    expect(doc).toContain('A forecast is only as good as the luminosity function assumed');
    expect(doc).toContain('table in z, interpolated linearly: z = 0.8: -1.5; z = 1.6: -1.6');
  });

  test('forecast and plan tables appear when given, and only then', async () => {
    const doc = await html();
    expect(doc).toContain('id="forecast-table"');
    expect(doc).toContain('id="correlation-table"');
    expect(doc).toContain('mean of 40 mock fits');
    expect(doc).toContain('id="plan-table"');
    expect(doc).toMatch(/<tr class="best">/);
    const bare = renderReport({
      surveyText: 'x',
      surveyTitle: 't',
      prediction: demoPrediction({ slices: 2 }),
      figures: [],
    });
    expect(bare).not.toContain('id="forecast"');
    expect(bare).not.toContain('id="plan"');
    expect(bare).not.toContain('id="figures"');
  });

  test('a plan ranked across the model (robust: true) says so, shows the goal at the pessimistic case and names the best under the assumed values', () => {
    // invented: the pessimistic goal (a count, so its 16th percentile) falls faster with depth,
    // so the robust best (the largest pessimistic count) is a shallower design than the assumed best
    const base = demoPlan();
    const designs = base.designs.map((d, i) => ({ ...d, goal_value_pessimistic: d.goal_value * (1 - 0.12 * i) }));
    const byAssumed = designs.reduce((a, b) => (b.goal_value > a.goal_value ? b : a));
    const byRobust = designs.reduce((a, b) => (b.goal_value_pessimistic > a.goal_value_pessimistic ? b : a));
    expect(byRobust).not.toBe(byAssumed);
    const plan = {
      ...base,
      designs,
      best: byRobust,
      robust: { draws: 200, source: 'normal' as const, percentile: 0.16, same_design: false, best_assumed: byAssumed },
    };
    const doc = renderReport({
      surveyText: 'x',
      surveyTitle: 't',
      prediction: demoPrediction({ slices: 2 }),
      plan,
      figures: [],
    });
    expect(doc).toContain('<p id="plan-robust">Ranked across the model');
    expect(doc).toContain('the 16th percentile over 200 draws of model_uncertainty');
    expect(doc).toContain(
      `under the assumed values the best is ${byAssumed.pointings} pointings of ${formatNumber(byAssumed.exposure_hours_per_pointing)} hours.`,
    );
    expect(doc).toContain('goal at model p16');
    // one row per design, each with its pessimistic goal; the robust best marked best, the
    // assumed best named in its row
    const rows = [...doc.matchAll(/<tr(?: class="[a-z]+")?><td>.*?<\/tr>/g)].map((m) => m[0]);
    const planRows = rows.filter((r) =>
      designs.some((d) => r.includes(`<td>${formatNumber(d.goal_value_pessimistic)}</td>`)),
    );
    expect(planRows).toHaveLength(designs.length);
    const best = planRows.filter((r) => r.startsWith('<tr class="best">'));
    expect(best).toHaveLength(1);
    expect(best[0]).toContain(`<td>${formatNumber(byRobust.goal_value_pessimistic)}</td><td>best</td>`);
    expect(planRows.filter((r) => r.includes('best under the assumed values'))).toHaveLength(1);
    expect(planRows.find((r) => r.includes('best under the assumed values'))).toContain(
      `<td>${formatNumber(byAssumed.goal_value)}</td>`,
    );
    // without robust, none of it
    const plain = renderReport({
      surveyText: 'x',
      surveyTitle: 't',
      prediction: demoPrediction({ slices: 2 }),
      plan: base,
      figures: [],
    });
    expect(plain).not.toContain('plan-robust');
    expect(plain).not.toContain('goal at model');
  });

  test('every figure is embedded once, as inline SVG without namespace URLs', async () => {
    const doc = await html();
    // the clip-path and gradient ids are numbered again over the document (next test)
    const anyIds = (s: string) => s.replace(/(id="|url\(#)(clip|gradient_)\d+/g, '$1$2#');
    for (const f of figures) {
      expect(doc.split(`id="figure-${f.name}"`)).toHaveLength(2);
      expect(anyIds(doc)).toContain(anyIds(svgForHtml(f.svg)));
    }
    expect(doc.match(/<svg\b/g)).toHaveLength(figures.length);
  });

  test('clip-path ids: unique in the document, numbered from 1, the same when the figures are drawn again', async () => {
    const again = async () =>
      renderReport({
        surveyText: 'x',
        surveyTitle: 't',
        prediction: demoPrediction({ slices: 3 }),
        figures: await buildFigures({ prediction: demoPrediction({ slices: 3 }), surveyTitle: 't' }),
      });
    const first = await again();
    const ids = [...first.matchAll(/id="(clip\d+)"/g)].map((m) => m[1]!);
    expect(ids.length).toBeGreaterThan(0);
    expect(new Set(ids).size).toBe(ids.length);
    expect(ids).toEqual(ids.map((_, k) => `clip${k + 1}`));
    for (const m of first.matchAll(/url\(#(clip\d+)\)/g)) expect(ids).toContain(m[1]);
    // the renderer's counter has moved on; the document has not
    expect(await again()).toBe(first);
  });

  test('a figure that is not plain SVG is refused', () => {
    expect(() =>
      renderReport({
        surveyText: '',
        surveyTitle: 't',
        prediction: demoPrediction({ slices: 1 }),
        figures: [{ name: 'bad', title: 'bad', spec: {}, svg: '<svg><script>x()</script></svg>' }],
      }),
    ).toThrow(/cannot be embedded/);
  });
});

describe('renderReport: the model table in words', () => {
  /** The model section's rows as [head, value], both as HTML. */
  function modelRows(doc: string): [string, string][] {
    const section = /<section class="assumption" id="model">([\s\S]*?)<\/section>/.exec(doc)![1]!;
    return [...section.matchAll(/<tr><th scope="row">(.*?)<\/th><td>(.*?)<\/td><\/tr>/g)].map((m) => [m[1]!, m[2]!]);
  }
  const render = (model: Record<string, unknown>) =>
    renderReport({ surveyText: '', surveyTitle: 't', prediction: demoPrediction({ slices: 2 }), model, figures: [] });

  test('every key a population may hold (specs/survey.schema.json) gets a label of its own and a value in words, never JSON (failed before: equivalent_widths as {"model":...}, "bias bias")', () => {
    const schema = JSON.parse(readFileSync(new URL('../../specs/survey.schema.json', import.meta.url), 'utf8')) as {
      $defs: { population: { properties: Record<string, unknown> } };
    };
    // invented values, one of each form the schema allows
    const values: Record<string, unknown> = {
      quantity: 'stellar mass [Msun]',
      phi_star: 0.002,
      log10_phi_star: '-2.6 - 0.1*z',
      phi_star_dex: {
        table: [
          [0.5, 0.003],
          [1.5, 0.002],
        ],
      },
      log10_phi_star_dex: -2.3,
      l_star: 2e42,
      log10_l_star: 42.3,
      m_star: -20.9,
      alpha: -1.4,
      phi_star_1: 0.001,
      log10_phi_star_1: -2.8,
      phi_star_1_dex: 0.002,
      log10_phi_star_1_dex: -2.5,
      alpha_1: -0.45,
      phi_star_2: 3e-4,
      log10_phi_star_2: -3.5,
      phi_star_2_dex: 7e-4,
      log10_phi_star_2_dex: -3.2,
      alpha_2: -1.5,
      line: '6562.8 Angstrom',
      rest_wavelength: 1500,
      beta: 0.5,
      sed: { file: 'spectra/passive.csv' },
      rest_band: { center: 1500, fwhm: '300 Angstrom', profile: 'gaussian' },
      system: 'vega',
      vega_to_ab: 0.2,
      bias: 'auto',
      occupation: 0.5,
      model_uncertainty: {
        log10_phi_star: 0.1,
        m_star: 0.2,
        alpha: 0.05,
        correlation: { 'log10_phi_star-alpha': 0.6 },
      },
      redshift_selection: 0.8,
      blend_ratio: 0.3,
      blended_lines: [
        { line: 6583.45, ratio: 0.15 },
        { line: '6548.05 Angstrom', ratio: 0.05 },
      ],
      attenuation: 1.1,
      equivalent_widths: {
        model: 'table',
        table: [
          [0, 1],
          [40, 0.5],
          [200, 0],
        ],
      },
      valid_redshift: { min: 0.7, max: 2 },
      sfr_conversion: 1e-41,
    };
    const keys = Object.keys(schema.$defs.population.properties).filter(
      (k) => !['name', 'shape', 'variable'].includes(k),
    );
    // the invented population holds every key of the schema (a key added there needs a value here)
    expect(keys.filter((k) => !(k in values))).toEqual([]);
    const rows = modelRows(render({ name: 'p', shape: 'schechter', variable: 'luminosity', ...values }));
    expect(rows.map(([h]) => /<span class="key">([^<]*)<\/span>/.exec(h)?.[1])).toEqual(keys);
    const wrong = rows.filter(([head, value]) => {
      const label = unescapeHtml(head.replace(/<span class="key">[^<]*<\/span>/, '')).trim();
      const key = /<span class="key">([^<]*)<\/span>/.exec(head)![1]!;
      const v = unescapeHtml(value);
      return (
        label === '' ||
        label.toLowerCase() === key.replace(/_/g, ' ') ||
        /[{}]|":|\[object|NaN|Infinity|undefined/.test(v) ||
        v.trim() === ''
      );
    });
    expect(wrong).toEqual([]);
    // values in words and units, as written (the invented values above)
    const byKey = Object.fromEntries(
      rows.map(([h, v]) => [/<span class="key">([^<]*)<\/span>/.exec(h)![1]!, unescapeHtml(v)]),
    );
    expect(byKey.rest_wavelength).toBe('1,500 Å');
    expect(byKey.beta).toBe('0.5');
    expect(byKey.sed).toBe('spectra/passive.csv');
    expect(byKey.rest_band).toBe('Gaussian band centred at 1,500 Å, FWHM 300 Angstrom');
    expect(byKey.system).toBe('Vega');
    expect(byKey.vega_to_ab).toBe('0.2 mag');
    expect(byKey.phi_star_dex).toBe('table in z, interpolated linearly: z = 0.5: 0.003; z = 1.5: 0.002');
    expect(byKey.log10_phi_star).toBe('<code>-2.6 - 0.1*z</code>');
    expect(byKey.model_uncertainty).toBe('log₁₀ φ* 0.1 dex, M* 0.2 mag, α 0.05; correlation of log₁₀ φ* and α 0.6');
    expect(byKey.equivalent_widths).toBe(
      'fraction above W, interpolated linearly: W = 0 Å: 1; W = 40 Å: 0.5; W = 200 Å: 0',
    );
    expect(byKey.valid_redshift).toBe('0.7 to 2');
    expect(byKey.blended_lines).toBe(
      "6,583.45 Å at 0.15 of the line's flux; 6548.05 Angstrom at 0.05 of the line's flux",
    );
    expect(byKey.sfr_conversion).toBe('1 × 10<sup>-41</sup> M☉ yr⁻¹ per erg s⁻¹');
    expect(byKey.bias).toMatch(/^auto: /);
  });

  test('wavelengths and other values of 1,000 or more as written, every digit (failed before: line 6562.8 as "6,563 Å")', () => {
    const rows = Object.fromEntries(
      modelRows(
        render({
          variable: 'luminosity',
          line: 6562.8,
          rest_wavelength: 1215.67,
          l_star: 1.23456789e42,
          equivalent_widths: { model: 'lognormal', median: 1234.5, sigma_dex: 0.35 },
          rest_band: { profile: 'tophat', center: 1527.25, fwhm: 1024.5 },
          blended_lines: [{ line: 6583.45, ratio: 0.15 }],
        }),
      ).map(([h, v]) => [/<span class="key">([^<]*)<\/span>/.exec(h)![1]!, unescapeHtml(v)]),
    );
    expect(rows.line).toBe('6,562.8 Å');
    expect(rows.rest_wavelength).toBe('1,215.67 Å');
    expect(rows.l_star).toBe('1.23456789 × 10<sup>42</sup>');
    expect(rows.equivalent_widths).toBe('log-normal, median 1,234.5 Å, 0.35 dex');
    expect(rows.rest_band).toBe('top-hat band centred at 1,527.25 Å, FWHM 1,024.5 Å');
    expect(rows.blended_lines).toBe("6,583.45 Å at 0.15 of the line's flux");
  });

  test('the other forms in words: lognormal and exponential widths, draws_file, a band file, a bias in z, named SFR calibrations', () => {
    const rows = (m: Record<string, unknown>) =>
      Object.fromEntries(
        modelRows(render({ variable: 'magnitude', ...m })).map(([h, v]) => [
          /<span class="key">([^<]*)<\/span>/.exec(h)?.[1] ?? unescapeHtml(h),
          unescapeHtml(v),
        ]),
      );
    const a = rows({
      equivalent_widths: { model: 'lognormal', median: '55 Angstrom', sigma_dex: 0.35 },
      model_uncertainty: { draws_file: 'draws.csv' },
      rest_band: { file: 'band.csv' },
      bias: '1.2 + 0.4*z',
      sfr_conversion: 'uv',
      values_used: 'Schechter function in magnitude, M* = -20.9 AB',
    });
    expect(a.equivalent_widths).toBe('log-normal, median 55 Angstrom, 0.35 dex');
    expect(a.model_uncertainty).toBe('draws read from <code>draws.csv</code>');
    expect(a.rest_band).toBe('transmission from <code>band.csv</code>');
    expect(a.bias).toBe('<code>1.2 + 0.4*z</code>');
    expect(a.sfr_conversion).toBe('Kennicutt (1998), from the UV continuum');
    // computed for the reader, not a key of the file: its label alone
    expect(a['values used']).toBe('Schechter function in magnitude, M* = -20.9 AB');
    const b = rows({ equivalent_widths: { model: 'exponential', scale: 20 }, sfr_conversion: 2e-28, bias: 1.5 });
    expect(b.equivalent_widths).toBe('exponential, scale 20 Å');
    expect(b.sfr_conversion).toBe('2 × 10<sup>-28</sup> M☉ yr⁻¹ per erg s⁻¹ Hz⁻¹');
    expect(b.bias).toBe('1.5');
    // a key the table has no words for (a library caller's own): words, never JSON
    const c = rows({ custom: { min: 1, list: [1, 2] } });
    expect(c.custom).toBe('<span class="key">min</span> 1, <span class="key">list</span> 1; 2');
  });
});

describe('module boundaries', () => {
  test('report.ts and write-figures.ts do not import vega (commands that draw nothing never load it)', () => {
    for (const f of ['report.ts', 'write-figures.ts', 'types.ts']) {
      const src = readFileSync(new URL(`../../src/render/${f}`, import.meta.url), 'utf8');
      expect(src).not.toMatch(/from\s+['"]vega(-lite)?['"]|import\(\s*['"]vega/);
    }
    const fig = readFileSync(new URL('../../src/render/figures.ts', import.meta.url), 'utf8');
    expect(fig).not.toMatch(/^import[^;]*from\s+['"]vega(-lite)?['"]/m); // only dynamic imports
  });
});
