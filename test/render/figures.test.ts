import { readFileSync } from 'node:fs';
import { describe, expect, test } from 'vitest';
import {
  DELTA_CHI2_2D,
  PALETTE,
  buildFigures,
  countRows,
  countsFigure,
  countsSpec,
  detectedPart,
  ellipseAxes,
  ellipsePoints,
  forecastFigure,
  forecastSpec,
  histogramsFigure,
  histogramsSpec,
  luminosityFunctionFigure,
  luminosityFunctionSpec,
  planFigure,
  planSpec,
  powerOfTen,
  renderSvg,
  drawnBins,
  smallCountText,
  type Cov2,
} from '../../src/render/figures.js';
import type { PredictionView } from '../../src/render/types.js';
import { demoForecast, demoPlan, demoPrediction } from './demo.js';
import type { Json } from '../support/json.js';

type Any = Json;

/** Bars drawn by vega in an SVG: aria label and rectangle (x, y, width, height) from the path. */
function bars(svg: string): { label: string; x: number; y: number; w: number; h: number }[] {
  const re =
    /<path aria-label="([^"]*)" role="graphics-symbol" aria-roledescription="bar" d="M([-\d.e]+),([-\d.e]+)h([-\d.e]+)v([-\d.e]+)h[-\d.e]+Z"/g;
  return [...svg.matchAll(re)].map((m) => ({ label: m[1]!, x: +m[2]!, y: +m[3]!, w: +m[4]!, h: +m[5]! }));
}

/** "values from 0 to 4,500" in an axis aria label -> [0, 4500]. */
function axisDomain(svg: string, axis: 'X' | 'Y', nth = 0): [number, number] {
  const re = new RegExp(
    `aria-label="${axis}-axis titled '[^']*' for a (?:linear|log) scale with values from ([-\\d.,e]+) to ([-\\d.,e]+)"`,
    'g',
  );
  const m = [...svg.matchAll(re)][nth];
  if (!m) throw new Error(`no ${axis} axis`);
  return [Number(m[1]!.replace(/,/g, '')), Number(m[2]!.replace(/,/g, ''))];
}

const demo = demoPrediction();

describe('counts figure: the drawn numbers are the prediction numbers (demo object)', () => {
  test('spec data values equal each slice z_min, z_max, count and the 1-sigma bounds', () => {
    const spec = countsSpec(demo) as Any;
    const values = spec.data.values as Any[];
    expect(values).toHaveLength(demo.slices.length);
    demo.slices.forEach((s, i) => {
      expect(values[i]).toMatchObject({ z_min: s.z_min, z_max: s.z_max, count: s.count, per_deg2: s.per_deg2 });
      expect(values[i]!.low).toBe(s.count * (1 - s.uncertainty!.total_fraction));
      expect(values[i]!.high).toBe(s.count * (1 + s.uncertainty!.total_fraction));
    });
  });

  test('SVG bar heights and positions give back every count and slice edge (to 1e-6)', async () => {
    const fig = (await countsFigure(demo))!;
    const drawn = bars(fig.svg);
    expect(drawn).toHaveLength(demo.slices.length);
    const [y0, y1] = axisDomain(fig.svg, 'Y');
    const [x0, x1] = axisDomain(fig.svg, 'X');
    expect(y0).toBe(0);
    const height = 300; // countsSpec height
    const width = 560;
    drawn.forEach((b, i) => {
      const s = demo.slices[i]!;
      expect((b.h / height) * y1).toBeCloseTo(s.count, 6);
      expect(x0 + (b.x / width) * (x1 - x0)).toBeCloseTo(s.z_min, 9);
      expect(x0 + ((b.x + b.w) / width) * (x1 - x0)).toBeCloseTo(s.z_max, 9);
      // the bar's aria label carries the count as vega formats it (6 significant digits)
      expect(b.label).toContain(`count: ${Number(s.count.toPrecision(6))}`);
    });
  });

  test('error bars are drawn only when an uncertainty is present', async () => {
    const plain = demoPrediction({ uncertainty: false });
    expect((countsSpec(plain) as Any).layer).toHaveLength(1);
    expect(countRows(plain).every((r) => r.low === undefined)).toBe(true);
    const withU = (await countsFigure(demo))!;
    const without = (await countsFigure(plain))!;
    expect(withU.svg).toContain('aria-roledescription="errorbar"');
    expect(without.svg).not.toContain('errorbar');
  });

  test('title carries the survey title', async () => {
    const fig = (await countsFigure(demo))!;
    expect(fig.title.startsWith(demo.title)).toBe(true);
    expect(fig.svg).toContain(demo.title);
  });
});

describe('histogram figure: small multiples hold each slice histogram', () => {
  test('spec panels hold every bin edge and count of every slice', () => {
    const spec = histogramsSpec(demo) as Any;
    const values = spec.data.values as Any[];
    expect(new Set(values.map((r) => r.slice)).size).toBe(demo.slices.length);
    expect(spec.facet.field).toBe('panel');
    demo.slices.forEach((s, i) => {
      const rows = values.filter((r) => r.slice === i + 1);
      expect(rows.map((r) => r.count)).toEqual(s.histogram!.counts);
      expect(rows.map((r) => r.lo)).toEqual(s.histogram!.edges.slice(0, -1));
      expect(rows.map((r) => r.hi)).toEqual(s.histogram!.edges.slice(1));
      expect(new Set(rows.map((r) => r.panel))).toEqual(new Set([`z ${s.z_min.toFixed(2)}–${s.z_max.toFixed(2)}`]));
    });
    expect(spec.spec.encoding.x.title).toBe('log₁₀ line flux [erg s⁻¹ cm⁻²]');
  });

  test('SVG has one bar per bin, heights proportional to the counts within each panel', async () => {
    const fig = (await histogramsFigure(demo))!;
    const drawn = bars(fig.svg);
    const nBins = demo.slices[0]!.histogram!.counts.length;
    expect(drawn).toHaveLength(demo.slices.length * nBins);
    demo.slices.forEach((s, i) => {
      const panel = drawn.slice(i * nBins, (i + 1) * nBins);
      const [, yMax] = axisDomain(fig.svg, 'Y', i);
      const height = (histogramsSpec(demo) as Any).spec.height as number;
      panel.forEach((b, k) => expect((b.h / height) * yMax).toBeCloseTo(s.histogram!.counts[k]!, 6));
    });
  });

  test('an absolute-magnitude model and a threshold histogram get their own axis labels', () => {
    const p = demoPrediction({ slices: 2 });
    for (const s of p.slices) s.histogram!.variable = 'apparent_magnitude';
    expect((histogramsSpec(p) as Any).spec.encoding.x.title).toBe('apparent AB magnitude [mag]');
    for (const s of p.slices) s.histogram!.variable = 'log10_quantity';
    expect((histogramsSpec(p, { quantity: 'stellar mass [Msun]' }) as Any).spec.encoding.x.title).toBe(
      'log₁₀ stellar mass [Msun]',
    );
  });
});

describe('luminosity-function figure', () => {
  test('each panel draws its slice curve, limit and knee', () => {
    const spec = luminosityFunctionSpec(demo) as Any;
    const values = spec.data.values as Any[];
    expect(new Set(values.map((r) => r.slice)).size).toBe(demo.slices.length);
    const layers = spec.spec.layer as Any[];
    const kindOf = (l: Any) => /datum\.kind === '(\w+)'/.exec(l.transform[0].filter)![1];
    expect(layers.map((l) => `${l.mark.type}:${kindOf(l)}`)).toEqual([
      'area:detected',
      'line:curve',
      'rule:limit',
      'rule:knee',
      'text:knee',
    ]);
    demo.slices.forEach((s, i) => {
      const c = s.luminosity_function!;
      const rows = values.filter((r) => r.slice === i + 1);
      // every drawn point is a point of the input curve
      const curve = rows.filter((r) => r.kind === 'curve');
      expect(curve.length).toBeGreaterThan(10);
      for (const r of curve) {
        const j = c.x.indexOf(r.x);
        expect(j).toBeGreaterThanOrEqual(0);
        expect(r.phi).toBe(c.phi[j]);
      }
      expect(rows.filter((r) => r.kind === 'limit').map((r) => r.x)).toEqual([c.limit]);
      expect(rows.filter((r) => r.kind === 'knee').map((r) => [r.x, r.label])).toEqual([[c.knee, 'L*']]);
      const detected = rows.filter((r) => r.kind === 'detected');
      expect(Math.min(...detected.map((r) => r.x))).toBeCloseTo(c.limit!, 12);
    });
  });

  test('detected part: brighter side of the limit, starting at the limit (interpolated in log10 phi)', () => {
    const rows = [
      { x: 41, phi: 4e-2 },
      { x: 42, phi: 1e-4 },
      { x: 43, phi: 1e-6 },
    ];
    // closed form: halfway between 41 and 42 in log10 phi is sqrt(4e-2 x 1e-4) = 2e-3
    expect(detectedPart(rows, 41.5, false)).toEqual([{ x: 41.5, phi: expect.closeTo(2e-3, 15) }, rows[1], rows[2]]);
    // magnitudes: brighter is smaller, so the detected side is x <= limit
    const mags = [
      { x: -23, phi: 1e-6 },
      { x: -21, phi: 2.5e-3 },
      { x: -19, phi: 1e-2 },
    ];
    const part = detectedPart(mags, -20, true);
    expect(part.map((r) => r.x)).toEqual([-23, -21, -20]);
  });

  test('a magnitude population marks M* and labels phi per magnitude', () => {
    const p = demoPrediction({ slices: 2 });
    for (const s of p.slices) {
      const c = s.luminosity_function!;
      c.x = c.x.map((lx) => -2.5 * lx + 85);
      c.limit = -2.5 * c.limit! + 85;
      c.knee = -2.5 * c.knee + 85;
      c.x_label = '';
    }
    const spec = luminosityFunctionSpec(p, { variable: 'magnitude' }) as Any;
    const values = (spec.data.values as Any[]).filter((r) => r.slice === 1);
    expect(values.find((r) => r.kind === 'knee')!.label).toBe('M*');
    const line = (spec.spec.layer as Any[]).find((l) => l.mark.type === 'line')!;
    expect(line.encoding.y.title).toBe('φ [Mpc⁻³ mag⁻¹]');
    expect(line.encoding.x.title).toBe('absolute AB magnitude M [mag]');
    const detected = values.filter((r) => r.kind === 'detected');
    expect(Math.max(...detected.map((r) => r.x))).toBeCloseTo(p.slices[0]!.luminosity_function!.limit!, 12);
  });
});

describe('forecast figure: Fisher ellipses', () => {
  const ref = JSON.parse(readFileSync(new URL('../reference/chi2-2dof.json', import.meta.url), 'utf8')) as {
    rows: { k_sigma: number; delta_chi2: number }[];
  };
  test('Delta chi2 of the 1- and 2-sigma joint regions equal scipy 1.10.1 chi2.ppf (rel 1e-12)', () => {
    // reference: test/reference/chi2-2dof.json (generator test/reference/generate/chi2_2dof.py)
    expect(DELTA_CHI2_2D.one).toBeCloseTo(ref.rows[0]!.delta_chi2, 12);
    expect(DELTA_CHI2_2D.two).toBeCloseTo(ref.rows[1]!.delta_chi2, 11);
  });

  const cov: Cov2 = [
    [0.09 ** 2, -0.7 * 0.09 * 0.04],
    [-0.7 * 0.09 * 0.04, 0.04 ** 2],
  ];
  test('every ellipse point lies on (p-c)^T C^-1 (p-c) = Delta chi2 (closed form, 1e-10)', () => {
    const pts = ellipsePoints(-1.5, 42.4, cov, DELTA_CHI2_2D.one, 90);
    const [[a, b], [, c]] = cov;
    const det = a * c - b * b;
    for (const { x, y } of pts) {
      const dx = x + 1.5;
      const dy = y - 42.4;
      const q = (c * dx * dx - 2 * b * dx * dy + a * dy * dy) / det;
      expect(q).toBeCloseTo(DELTA_CHI2_2D.one, 10);
    }
    expect(pts[0]).toEqual(pts[pts.length - 1]); // closed
  });

  test('the Delta chi2 = 1 ellipse spans exactly +-sigma in each parameter (projection of the marginal, closed form)', () => {
    const pts = ellipsePoints(0, 0, cov, 1, 20000);
    const xs = pts.map((p) => p.x);
    const ys = pts.map((p) => p.y);
    expect(Math.max(...xs)).toBeCloseTo(0.09, 6);
    expect(Math.min(...ys)).toBeCloseTo(-0.04, 6);
  });

  test('no ellipse for a covariance that is not positive definite', () => {
    expect(
      ellipsePoints(
        0,
        0,
        [
          [1, 1],
          [1, 1],
        ],
        1,
      ),
    ).toEqual([]);
    expect(
      ellipsePoints(
        0,
        0,
        [
          [-1, 0],
          [0, 1],
        ],
        1,
      ),
    ).toEqual([]);
  });

  test('axes come from sigma and correlation; linear L* moves to log10 L* (first order)', () => {
    const f = demoForecast({ mocks: 0 });
    const axes = ellipseAxes(f)!;
    expect(axes.center).toEqual([-1.5, 42.4]);
    expect(axes.cov[0][1]).toBeCloseTo(-0.7 * 0.09 * 0.04, 15);
  });

  test('spec holds both ellipses and every mock fit', () => {
    const f = demoForecast({ mocks: 50 });
    const spec = forecastSpec(f, 'Demo') as Any;
    const mocks = spec.layer[0].data.values as Any[];
    expect(mocks).toHaveLength(50);
    mocks.forEach((m, i) => expect([m.x, m.y]).toEqual([f.mocks!.fits![i]![2], f.mocks!.fits![i]![1]]));
    const regions = new Set((spec.layer[1].data.values as Any[]).map((r) => r.region));
    expect([...regions]).toEqual(['1σ (68.3%)', '2σ (95.4%)']);
  });

  test('without mocks the figure still draws; without alpha or L* there is no figure', async () => {
    const fig = (await forecastFigure(demoForecast({ mocks: 0 }), 'Demo'))!;
    expect(fig.svg).toContain('1σ (68.3%)');
    expect(
      forecastSpec({ parameters: ['log10_phi_star'], fisher: { sigma: {}, correlation: [[1]] }, center: {} }),
    ).toBeNull();
  });
});

describe('plan figure', () => {
  test('spec holds every design in exposure order, the best one and the near-best band', async () => {
    const plan = demoPlan();
    const spec = planSpec(plan, 'Demo') as Any;
    const band = spec.layer[0].data.values[0];
    expect(band).toEqual({ from: 0.5, to: 2 });
    const line = spec.layer[1];
    expect(line.encoding.x.scale.type).toBe('log');
    expect(line.data.values.map((d: Any) => d.goal_value)).toEqual(plan.designs.map((d) => d.goal_value));
    expect(spec.layer[2].data.values[0].exposure_hours_per_pointing).toBe(plan.best!.exposure_hours_per_pointing);
    const fig = (await planFigure(plan, 'Demo'))!;
    expect(fig.svg).toContain(`best: 1 h × ${plan.best!.pointings} pointings`);
  });

  test('a best design of two tiers is labelled tier by tier (failed before: "2.8 h × 358 pointings", the deepest tier\'s exposure with the total pointings, no design of the plan)', async () => {
    const base = demoPlan();
    // the design at 2 h as the deep tier of two: 0.05 h x 300 wide and 2 h x 8 deep
    const tiers = [
      {
        budget_fraction: 0.6,
        exposure_hours_per_pointing: 0.05,
        pointings: 300,
        area_deg2: 15,
        limit: -16,
        count: 100,
      },
      { budget_fraction: 0.4, exposure_hours_per_pointing: 2, pointings: 8, area_deg2: 0.4, limit: -16.65, count: 50 },
    ];
    const best = { ...base.best!, exposure_hours_per_pointing: 2, pointings: 308, tiers };
    const plan = { ...base, designs: base.designs.map((d) => (d.exposure_hours_per_pointing === 2 ? best : d)), best };
    const fig = (await planFigure(plan, 'Demo'))!;
    expect(fig.svg).toContain('best: 0.05 h × 300 + 2 h × 8 pointings');
    expect(fig.svg).not.toContain('2 h × 308');
    expect(fig.svg).toContain('exposure per pointing of the deepest tier [hours]');
    // one tier: the axis as before
    expect((await planFigure(base, 'Demo'))!.svg).not.toContain('deepest tier');
  });

  test('ranked across the model (robust: true): a dashed curve of the goal at the pessimistic case, named in the subtitle; without robust none (failed before: only the assumed goal was drawn beside a best chosen by the other)', async () => {
    const base = demoPlan();
    const designs = base.designs.map((d, i) => ({ ...d, goal_value_pessimistic: d.goal_value * (1 - 0.12 * i) }));
    const best = designs.reduce((a, b) => (b.goal_value_pessimistic > a.goal_value_pessimistic ? b : a));
    const assumed = designs.reduce((a, b) => (b.goal_value > a.goal_value ? b : a));
    const plan = {
      ...base,
      designs,
      best,
      robust: { draws: 200, source: 'normal' as const, percentile: 0.16, same_design: false, best_assumed: assumed },
    };
    const spec = planSpec(plan, 'Demo') as Any;
    const dashed = spec.layer.filter((l: Any) => l.mark?.strokeDash);
    expect(dashed).toHaveLength(1);
    expect(dashed[0].encoding.y.field).toBe('goal_value_pessimistic');
    expect(dashed[0].data.values.map((d: Any) => d.goal_value_pessimistic)).toEqual(
      designs.map((d) => d.goal_value_pessimistic),
    );
    // the subtitle wraps over lines
    expect((spec.title.subtitle as string[]).join(' ')).toContain(
      "dashed: at the model's p16, by which the best is ranked",
    );
    // the diamond stays on the best design
    expect(spec.layer[2].data.values[0].exposure_hours_per_pointing).toBe(best.exposure_hours_per_pointing);
    const svg = (await planFigure(plan, 'Demo'))!.svg;
    expect(svg).toContain('stroke-dasharray="6,4"');
    const plain = planSpec(base, 'Demo') as Any;
    expect(plain.layer.filter((l: Any) => l.mark?.strokeDash)).toHaveLength(0);
    expect(JSON.stringify(plain.title)).not.toContain('dashed');
  });

  test('without best or near-best: just the curve', () => {
    const plan = demoPlan();
    delete plan.best;
    delete plan.near_best;
    expect((planSpec(plan) as Any).layer).toHaveLength(1);
  });
});

describe('graceful absence', () => {
  test('a prediction without histograms or curves gives only the counts figure', async () => {
    const p: PredictionView = demoPrediction({ histograms: false, curves: false, uncertainty: false });
    const figs = await buildFigures({ prediction: p });
    expect(figs.map((f) => f.name)).toEqual(['counts']);
    expect(await histogramsFigure(p)).toBeNull();
    expect(await luminosityFunctionFigure(p)).toBeNull();
  });

  test('all five figures for a full demo, each SVG non-empty and titled with the survey title', async () => {
    const figs = await buildFigures({ prediction: demo, forecast: demoForecast(), plan: demoPlan() });
    expect(figs.map((f) => f.name)).toEqual(['counts', 'histograms', 'luminosity-function', 'forecast', 'plan']);
    for (const f of figs) {
      expect(f.svg.startsWith('<svg')).toBe(true);
      expect(f.title).toContain(demo.title);
    }
  });

  test('non-finite numbers never reach the figure data', () => {
    const p = demoPrediction({ slices: 3 });
    p.slices[1]!.count = Number.NaN;
    expect(countRows(p).map((r) => r.slice)).toEqual([1, 3]);
  });
});

describe('no network, no disk', () => {
  test('a spec asking for data from a URL is refused by the loader (nothing fetched)', async () => {
    const spec = {
      data: { url: 'http://127.0.0.1:9/never.json' },
      mark: 'point',
      encoding: { x: { field: 'a', type: 'quantitative' } },
    };
    await expect(renderSvg(spec)).rejects.toThrow(/figures fetch nothing/);
  });

  test('an image mark with a URL is refused too', async () => {
    const spec = {
      data: { values: [{ u: 'http://127.0.0.1:9/x.png' }] },
      mark: 'image',
      encoding: { url: { field: 'u' } },
    };
    await expect(renderSvg(spec)).rejects.toThrow(/figures fetch nothing/);
  });
});

describe('escaping in SVG text (vega escapes what it draws)', () => {
  test('a title with script and tag-breaking text appears only escaped', async () => {
    const nasty = '<script>alert(1)</script> "><img src=x onerror=alert(1)> </svg>';
    const fig = (await countsFigure(demoPrediction({ slices: 2, title: nasty })))!;
    expect(fig.svg).not.toContain('<script');
    expect(fig.svg).not.toContain('<img');
    expect(fig.svg.indexOf('</svg')).toBe(fig.svg.length - 6);
    expect(fig.svg).toContain('&lt;script&gt;alert(1)&lt;/script&gt;');
  });
});

describe('palette', () => {
  /** CIE L* of an sRGB colour (IEC 61966-2-1 transfer curve, CIE 15 lightness formula, D65). */
  function lightness(hex: string): number {
    const lin = (c: number) => (c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4);
    const [r, g, b] = [1, 3, 5].map((i) => lin(parseInt(hex.slice(i, i + 2), 16) / 255)) as [number, number, number];
    const y = 0.2126 * r + 0.7152 * g + 0.0722 * b;
    const f = y > 216 / 24389 ? Math.cbrt(y) : ((24389 / 27) * y + 16) / 116;
    return 116 * f - 16;
  }
  test('every pair of colours differs by at least 15 in CIE L* (readable in greyscale)', () => {
    // check of the formula: sRGB mid grey #777777 has L* = 50.0 (common practice value, +-0.1)
    expect(lightness('#777777')).toBeCloseTo(50.03, 1);
    const ls = Object.values(PALETTE).map(lightness);
    for (let i = 0; i < ls.length; i++)
      for (let j = i + 1; j < ls.length; j++) expect(Math.abs(ls[i]! - ls[j]!)).toBeGreaterThan(15);
  });
});

describe('figures for a proposal', () => {
  test('powers of ten are written as 10⁻² (superscript digits), not 1e-2', () => {
    expect(powerOfTen(-2)).toBe('10⁻²');
    expect(powerOfTen(0)).toBe('10⁰');
    expect(powerOfTen(13)).toBe('10¹³');
  });

  test('counts spanning more than a factor of 10 sit on a log axis labelled 10ⁿ; bar tops at log10 of each count (failed before: always linear)', async () => {
    const p = demoPrediction({ slices: 4 });
    [3, 40, 900, 12].forEach((c, i) => {
      const s = p.slices[i]!;
      s.count = c;
      s.per_deg2 = c / 2.5;
      s.uncertainty!.total_fraction = 0.1;
    });
    const spec = countsSpec(p) as Any;
    expect(spec.layer[0].encoding.y.scale.type).toBe('log');
    const fig = (await countsFigure(p))!;
    for (const label of ['10⁰', '10¹', '10²', '10³']) expect(fig.svg).toContain(`>${label}<`);
    expect(fig.svg).not.toMatch(/>1e[-+]?\d/);
    // bar tops: height is 300 px over log10 of the axis domain [1, 1000] (floor and top decades)
    const drawn = bars(fig.svg);
    expect(drawn).toHaveLength(4);
    drawn.forEach((b, i) => expect(Math.log10(1) + (b.h / 300) * 3).toBeCloseTo(Math.log10(p.slices[i]!.count), 6));
    // within a factor of 10 the axis stays linear from 0
    expect((countsSpec(demo) as Any).layer[0].encoding.y.scale.type).toBeUndefined();
  });

  test('histogram panels each span their own range, without the negligible end bins; the bin width names the count axis (failed before: one shared range)', async () => {
    const p = demoPrediction({ slices: 2 });
    // slice 2: ten bins of nothing (or e^-30-small counts) below its 8 bins, which start at -16.5
    const h2 = p.slices[1]!.histogram!;
    h2.edges = Array.from({ length: 19 }, (_, k) => +(-17.5 + 0.1 * k).toFixed(1));
    h2.counts = [1e-12, 1e-9, ...new Array<number>(8).fill(0), ...h2.counts];
    const spec = histogramsSpec(p) as Any;
    expect(spec.resolve.scale.x).toBe('independent');
    expect(spec.spec.encoding.y.title).toBe('count per 0.1 dex bin');
    const rows = spec.data.values as Any[];
    const second = rows.filter((r) => r.slice === 2);
    expect(second[0]!.lo).toBeCloseTo(-16.5, 9);
    expect(second.map((r) => r.count)).toEqual(p.slices[1]!.histogram!.counts.slice(10));
    expect(drawnBins([{ lo: 0, hi: 1, count: 5 }])).toHaveLength(1);
    const fig = (await histogramsFigure(p))!;
    // panel 1 starts at its own first bin, -16.8; panel 2 at -16.5, not at the negligible -17.5
    const starts = [
      ...fig.svg.matchAll(/aria-label="X-axis titled '[^']*' for a linear scale with values from ([^ ]+) to/g),
    ].map((m) => Number(m[1]!.replace(/\u2212/g, '-')));
    expect(starts).toHaveLength(2);
    expect(starts[0]).toBeCloseTo(-16.8, 9);
    expect(starts[1]).toBeCloseTo(-16.5, 9);
  });

  test('histogram counts below 1e-3 are labelled 4×10⁻¹⁴, not 0.00000000000004 (failed before)', async () => {
    // a slice far beyond the limit (a GALEX-like FUV count at z = 0.45-0.5 holds 4e-14 sources)
    const p = demoPrediction({ slices: 2 });
    const h = p.slices[1]!.histogram!;
    h.counts = h.counts.map((c) => (c / h.counts[0]!) * 4e-14);
    const svg = (await histogramsFigure(p))!.svg;
    const labels = [...svg.matchAll(/<text[^>]*>([^<]*)<\/text>/g)].map((m) => m[1]!);
    expect(labels).toContain('4×10⁻¹⁴');
    expect(labels).toContain('10⁻¹⁴');
    expect(labels.some((l) => /^0\.0{5,}/.test(l))).toBe(false);
    // the first slice's counts (hundreds) keep vega's own labels
    expect(labels).toContain('200');
  });

  test('the count axis read aloud says 0 to 4×10⁻¹⁴ as its labels do, not 0.00000000000004 (failed before)', async () => {
    const p = demoPrediction({ slices: 2 });
    const h = p.slices[1]!.histogram!;
    h.counts = h.counts.map((c) => (c / h.counts[0]!) * 4e-14);
    const svg = (await histogramsFigure(p))!.svg;
    const captions = [...svg.matchAll(/aria-label="(Y-axis[^"]*)"/g)].map((m) => m[1]!);
    // one count axis per panel; the second's range is 0 to 4e-14 (its highest bin, niced), the
    // first's (hundreds of sources) as vega writes it
    expect(captions).toHaveLength(2);
    expect(captions[1]).toMatch(/ with values from 0 to 4×10⁻¹⁴$/);
    expect(captions[0]).toMatch(/ with values from 0 to \d{3}$/);
    expect([...svg.matchAll(/aria-label="([^"]*)"/g)].some((m) => /\b0\.0{5,}/.test(m[1]!))).toBe(false);
  });

  test('smallCountText writes counts as the tick labels do (values from memory of the 10^k notation)', () => {
    expect(smallCountText(4e-14, '0.00000000000004')).toBe('4×10⁻¹⁴');
    expect(smallCountText(1e-8, '0.00000001')).toBe('10⁻⁸');
    expect(smallCountText(2.5e-4, '0.00025')).toBe('2.5×10⁻⁴');
    expect(smallCountText(3e-12, '0.000000000003')).toBe('3×10⁻¹²');
    expect(smallCountText(0, '0.00000000000000')).toBe('0');
    expect(smallCountText(0, '0.0')).toBe('0.0');
    expect(smallCountText(0.002, '0.002')).toBe('0.002');
    expect(smallCountText(900, '900')).toBe('900');
  });

  test('luminosity-function ticks are powers of ten written 10⁻ⁿ (failed before: 1e-2)', async () => {
    const fig = (await luminosityFunctionFigure(demo))!;
    expect(fig.svg).toMatch(/>10⁻[⁰¹²³⁴⁵⁶⁷⁸⁹]+</);
    expect(fig.svg).not.toMatch(/>\de[-+]\d</);
  });

  test('a long title is wrapped over lines, never cut (failed before: ellipsis)', async () => {
    const long = `${'An invented survey with a long and winding name '.repeat(5).trim()} ending here`;
    // at most as many characters as the figure is wide (about 9 px each): 80 for a single plot, 120 for small multiples
    for (const [spec, name, most] of [
      [countsSpec({ ...demo, title: long }), 'counts', 80],
      [histogramsSpec({ ...demo, title: long }), 'histograms', 120],
      [planSpec(demoPlan(), long), 'plan', 80],
    ] as const) {
      const title = (spec as Any).title;
      expect(title.limit, name).toBeUndefined();
      const lines = title.text as string[];
      expect(lines.length, name).toBeGreaterThan(2);
      expect(lines.slice(0, -1).join(' '), name).toBe(long);
      for (const l of lines) expect(l.length, name).toBeLessThanOrEqual(most);
    }
    const fig = (await countsFigure({ ...demo, title: long }))!;
    expect(fig.svg).not.toContain('…');
    expect(fig.svg).toContain('ending here');
  });

  test('plan: the goal in words, and the best design labelled above the plot, clear of every point (failed before: the label sat among the points)', async () => {
    const plan = { ...demoPlan(), goal: { sigma: 'alpha' } };
    const spec = planSpec(plan) as Any;
    expect(spec.layer[1].encoding.y.title).toBe('goal: sigma of alpha');
    expect(spec.title.text.at(-1)).toBe('Sigma of alpha against exposure per pointing');
    const svg = (await planFigure(plan))!.svg;
    const label = /aria-roledescription="text mark"[^>]*transform="translate\(([-\d.e]+),([-\d.e]+)\)"/.exec(svg)!;
    const labelY = Number(label[2]);
    const pointYs = [
      ...svg.matchAll(/aria-roledescription="point" transform="translate\(([-\d.e]+),([-\d.e]+)\)"/g),
    ].map((m) => Number(m[2]));
    expect(pointYs.length).toBeGreaterThan(plan.designs.length);
    // text drawn upward from its baseline (baseline bottom) above y = 0; every point at y >= 0
    expect(labelY).toBeLessThan(0);
    expect(Math.min(...pointYs)).toBeGreaterThanOrEqual(0);
  });
});
