/**
 * The report's forecast and plan hooks (src/cli/commands/report.ts ReportSections) and the
 * adapters from the forecast and plan results to the figure layer (src/render/adapt.ts).
 * The forecast and plan objects below are INVENTED numbers shaped like the results of the
 * `forecast` and `plan` commands (fields as in their branches' Forecast and PlanJson types);
 * they test plumbing only, not any physics.
 */
import { describe, expect, test } from 'vitest';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { hasPlanSection } from '../../src/library/report.js';
import { runReport } from '../../src/cli/commands/report.js';
import type { CliIO } from '../../src/cli/io.js';
import type { Forecast } from '../../src/model/outputs/forecast.js';
import type { Plan } from '../../src/model/outputs/plan.js';
import { forecastSpec, planSpec } from '../../src/render/figures.js';
import { loadSurveyFile, loadSurveyText } from '../../src/survey/index.js';
import { tempDir } from '../support/temp.js';
import type { Json } from '../support/json.js';

type Any = Json;

const forecastResult = {
  format: 1,
  title: 'invented',
  parameters: ['log10_phi_star', 'log10_l_star', 'alpha'] as Forecast['parameters'],
  center: { log10_phi_star: -2.6, log10_l_star: 42.3, alpha: -1.45 },
  fisher: {
    sigma: { log10_phi_star: 0.08, log10_l_star: 0.05, alpha: 0.12 },
    correlation: [
      [1, -0.6, 0.7],
      [-0.6, 1, -0.8],
      [0.7, -0.8, 1],
    ],
    covariance: [] as number[][],
  },
  mocks: {
    count: 200,
    seed: 1,
    estimator: 'extended_likelihood',
    parameters: {
      log10_phi_star: { mean: -2.61, std: 0.081, p16: 0, p50: 0, p84: 0, bias: 0, bias_in_standard_errors: 0 },
      log10_l_star: { mean: 42.31, std: 0.052, p16: 0, p50: 0, p84: 0, bias: 0, bias_in_standard_errors: 0 },
      alpha: { mean: -1.46, std: 0.13, p16: 0, p50: 0, p84: 0, bias: 0, bias_in_standard_errors: 0 },
    },
    not_constrained: [],
    failed_fits: 0,
    mean_sources: 2800,
    notes: [],
  },
};

const d = (t: number, n: number, g: number) => ({
  exposure_hours_per_pointing: t,
  pointings: n,
  area_deg2: n * 0.5,
  limit: 1e-17 * Math.sqrt(4 / t),
  count: g,
  faint_count: g / 2,
  goal_value: g,
  hours_used: 40,
  meets_minimum_count: true,
});
const designs = [d(0.5, 60, 900), d(1, 36, 1300), d(2, 18, 1450), d(4, 9, 1200)];
const planResult = {
  format: 1,
  goal: { sigma: 'alpha' } as const,
  budget_hours: 40,
  designs,
  best: designs[2]!,
  near_best: { tolerance: 0.05, from: designs[1]!, to: designs[2]!, designs_within: 2, contiguous: true },
};

describe('the figures draw the results as their commands return them (no adapter between)', () => {
  test('forecast: the ellipse about the centre (alpha against log10 L*); no fits invented', () => {
    const spec = forecastSpec(forecastResult) as Any;
    const cross = spec.layer.find((l: Any) => l.mark.shape === 'cross');
    expect(cross.data.values).toEqual([{ x: -1.45, y: 42.3 }]);
    expect(spec.layer.find((l: Any) => l.mark.type === 'point' && l.mark.shape === 'circle')).toBeUndefined();
  });

  test('forecast: mock fits, when the result holds them, become the scattered points', () => {
    const fits = [
      [-2.6, 42.25, -1.38],
      [-2.62, 42.33, -1.5],
    ];
    const dots = (forecastSpec({ ...forecastResult, mocks: { ...forecastResult.mocks, fits } }) as Any).layer.find(
      (l: Any) => l.mark.type === 'point' && l.mark.shape === 'circle',
    );
    expect(dots.data.values).toEqual([
      { x: -1.38, y: 42.25 },
      { x: -1.5, y: 42.33 },
    ]);
  });

  test('plan: the goal in words and the near-best range in hours per pointing', () => {
    const spec = planSpec(planResult) as Any;
    expect(spec.layer[0].data.values).toEqual([{ from: 1, to: 2 }]);
    expect(spec.layer[1].encoding.y.title).toBe('goal: sigma of alpha');
  });
});

describe('report hooks', () => {
  const io = (): CliIO & { out: string; err: string } => {
    const o = { out: '', err: '', cwd: process.cwd(), stderrIsTTY: false } as CliIO & { out: string; err: string };
    o.stdout = (s: string) => void (o.out += s);
    o.stderr = (s: string) => void (o.err += s);
    return o;
  };

  test('a forecast hook adds its table and figure; the plan hook is not called without a plan section', async () => {
    const dir = tempDir('skytally-hooks-');
    const out = join(dir, 'r.html');
    let planCalls = 0;
    const code = await runReport(
      io(),
      'samples/halpha-narrowband.yaml',
      { out },
      {
        // the hooks return the results as the commands compute them (only the fields the report reads are filled in here)
        forecast: () => Promise.resolve(forecastResult as unknown as Forecast),
        plan: () => {
          planCalls++;
          return Promise.resolve(planResult as unknown as Plan);
        },
      },
    );
    expect(code).toBe(0);
    expect(planCalls).toBe(0);
    expect(hasPlanSection(loadSurveyFile('samples/halpha-narrowband.yaml'))).toBe(false);
    const html = readFileSync(out, 'utf8');
    expect(html).toContain('id="forecast-table"');
    expect(html).toContain('id="figure-forecast"');
    expect(html).toContain('mean of 200 mock fits');
    expect(html).not.toContain('id="plan-table"');
  });

  test('with a plan section the plan hook runs and its table and figure appear', async () => {
    const dir = tempDir('skytally-hooks-');
    const text = `${readFileSync('samples/halpha-narrowband.yaml', 'utf8')}plan: {budget_hours: 40}\n`;
    expect(hasPlanSection(loadSurveyText(text, 'p.yaml'))).toBe(true);
    const input = join(dir, 'p.yaml');
    writeFileSync(input, text);
    const code = await runReport(
      io(),
      input,
      { out: join(dir, 'r.html') },
      { plan: () => Promise.resolve(planResult as unknown as Plan) },
    );
    expect(code).toBe(0);
    const html = readFileSync(join(dir, 'r.html'), 'utf8');
    expect(html).toContain('id="plan-table"');
    expect(html).toContain('id="figure-plan"');
  });
});

// A script's report options are refused as the command line refuses --mocks, --seed and --draws
// (failed before: buildReport(survey, {mocks: 2.5}) reported the forecast as "cannot be computed
// for this survey"); --draws up to 100000 still reaches the forecast's model spread, whose own
// --model-draws stops at 10000 (a check of 10000 there omitted the report's forecast).
describe('report options', () => {
  const survey = loadSurveyFile(new URL('../../samples/mass-limited.yaml', import.meta.url).pathname);
  test.each([
    [{ mocks: 2.5 }, 'mocks'],
    [{ mocks: 10_001 }, 'mocks'],
    [{ seed: -1 }, 'seed'],
    [{ draws: -1 }, 'draws'],
    [{ draws: 100_001 }, 'draws'],
  ])('%j is bad_option naming %s', async (opts, keyPath) => {
    const { buildReport, reportSections } = await import('../../src/library/report.js');
    await expect(buildReport(survey, opts)).rejects.toMatchObject({ code: 'bad_option', keyPath });
    expect(() => reportSections(opts)).toThrow(`${keyPath}: is `);
  });
  test('draws above forecast --model-draws cap reach the forecast (its check takes the report cap)', async () => {
    const { forecast } = await import('../../src/forecast/forecast.js');
    await expect(forecast(survey, { modelDraws: 100_001 })).rejects.toMatchObject({
      code: 'bad_option',
      keyPath: 'modelDraws',
    });
    const f = await forecast(survey, { modelDraws: 10_001, cosmicVariance: false });
    expect(f.model_spread?.draws).toBe(10_001);
    const { reportSections } = await import('../../src/library/report.js');
    expect(() => reportSections({ draws: 100_000 })).not.toThrow();
  });
});
