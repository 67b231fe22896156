/**
 * Invented demo results for the figure and report tests. They have the shapes the figures and the
 * report read (src/render/types.ts, narrowed from the outputs' types) but their numbers are made up (a smooth pretend population), not computed by the
 * count engine and not a reference for anything.
 */
import type { ForecastView, PlanView, PredictionView, SliceView } from '../../src/render/types.js';

/** Deterministic pseudo-random numbers (LCG) so demo mocks are the same every run. */
function lcg(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return s / 2 ** 32;
  };
}

export function demoPrediction(
  opts: { slices?: number; title?: string; uncertainty?: boolean; curves?: boolean; histograms?: boolean } = {},
): PredictionView {
  const n = opts.slices ?? 10;
  const zMin = 0.8;
  const zMax = 1.6;
  const dz = (zMax - zMin) / n;
  const slices: SliceView[] = [];
  const logLStar = 42.4;
  const alpha = -1.5;
  for (let i = 0; i < n; i++) {
    const z0 = +(zMin + i * dz).toFixed(6);
    const z1 = +(zMin + (i + 1) * dz).toFixed(6);
    const zc = (z0 + z1) / 2;
    const limit = 41.6 + 0.9 * (zc - 0.8); // pretend log10 L limit rising with z
    const count = +(4200 * Math.exp(-1.8 * (zc - 0.8)) + 37.25 * i).toFixed(3);
    // histogram in log10 line flux: 8 bins of 0.1 dex from -16.8, shaped like a falling power law
    const edges = Array.from({ length: 9 }, (_, k) => +(-16.8 + 0.1 * k).toFixed(1));
    const weights = Array.from({ length: 8 }, (_, k) => Math.pow(0.72, k));
    const wsum = weights.reduce((a, b) => a + b, 0);
    const counts = weights.map((w) => (count * w) / wsum);
    const s: SliceView = {
      z_min: z0,
      z_max: z1,
      volume_mpc3: 1.1e6 + 2.5e5 * i,
      count,
      per_deg2: count / 2.5,
      limit_at_center: +limit.toFixed(4),
    };
    if (opts.histograms !== false) s.histogram = { variable: 'log10_line_flux', edges, counts };
    if (opts.uncertainty !== false) {
      const p = 1 / Math.sqrt(count);
      const cv = 0.08 + 0.01 * i;
      s.uncertainty = {
        poisson_fraction: p,
        cosmic_variance_fraction: cv,
        total_fraction: Math.hypot(p, cv),
        bias: 1.4 + 0.1 * i,
        sigma_matter: cv / (1.4 + 0.1 * i),
      };
    }
    if (opts.curves !== false) {
      const x = Array.from({ length: 61 }, (_, k) => 40.5 + 0.05 * k);
      const knee = logLStar + 0.3 * (zc - 0.8);
      const phi = x.map((lx) => {
        const r = 10 ** (lx - knee);
        return Math.LN10 * 6e-4 * r ** (alpha + 1) * Math.exp(-r);
      });
      s.luminosity_function = { x, phi, limit, knee, x_label: 'log₁₀ L [erg s⁻¹]' };
    }
    slices.push(s);
  }
  const total = slices.reduce((a, s) => a + s.count, 0);
  return {
    title: opts.title ?? 'Line-emitter search in a demo field',
    cosmology: { h0: 70, omega_m: 0.3, omega_lambda: 0.7, omega_r: 0, t_cmb: 0 },
    area_deg2: 2.5,
    redshift: { min: zMin, max: zMax },
    totals: {
      count: total,
      per_deg2: total / 2.5,
      volume_mpc3: slices.reduce((a, s) => a + s.volume_mpc3, 0),
      uncertainty: {
        poisson_fraction: 1 / Math.sqrt(total),
        cosmic_variance_fraction: 0.04,
        total_fraction: Math.hypot(1 / Math.sqrt(total), 0.04),
        bias: 1.5,
        sigma_matter: 0.027,
      },
    },
    slices,
    model: {
      name: 'demo emitters',
      shape: 'schechter',
      variable: 'luminosity',
      phi_star: 6e-4,
      log10_l_star: '42.4 + 0.3*(z - 0.8)',
      alpha: {
        table: [
          [0.8, -1.5],
          [1.6, -1.6],
        ],
      },
    },
  };
}

export function demoForecast(opts: { mocks?: number } = {}): ForecastView {
  const parameters: ForecastView['parameters'] = ['log10_phi_star', 'log10_l_star', 'alpha'];
  const sigma = { log10_phi_star: 0.05, log10_l_star: 0.04, alpha: 0.09 };
  const correlation = [
    [1, -0.6, 0.5],
    [-0.6, 1, -0.7],
    [0.5, -0.7, 1],
  ];
  const center = { log10_phi_star: -3.22, log10_l_star: 42.4, alpha: -1.5 };
  const f: ForecastView = { parameters, fisher: { sigma, correlation }, center };
  const n = opts.mocks ?? 200;
  if (n > 0) {
    const rnd = lcg(12345);
    const gauss = () => Math.sqrt(-2 * Math.log(1 - rnd())) * Math.cos(2 * Math.PI * rnd());
    const fits: number[][] = [];
    for (let i = 0; i < n; i++) {
      // correlated draw for (log10 L*, alpha) with rho = -0.7; phi* loosely tied
      const u = gauss();
      const v = gauss();
      const dl = sigma.log10_l_star * u;
      const da = sigma.alpha * (-0.7 * u + Math.sqrt(1 - 0.49) * v);
      fits.push([center.log10_phi_star + 0.05 * gauss(), center.log10_l_star + dl, center.alpha + da]);
    }
    f.mocks = { fits };
  }
  return f;
}

export function demoPlan(): PlanView {
  const exposures = [0.25, 0.5, 1, 2, 4, 8, 16];
  const budget = 40;
  const designs = exposures.map((t) => {
    const pointings = Math.floor(budget / (t + 0.6));
    const area = pointings * 0.05;
    const limit = -16.5 - 0.5 * Math.log10(t);
    const perDeg2 = 900 * Math.pow(t, 0.6);
    const count = area * perDeg2;
    return { exposure_hours_per_pointing: t, pointings, area_deg2: area, limit, count, goal_value: count };
  });
  const best = designs.reduce((a, b) => (b.goal_value > a.goal_value ? b : a));
  const at = (t: number) => designs.find((d) => d.exposure_hours_per_pointing === t)!;
  return { goal: 'count', budget_hours: budget, designs, best, near_best: { from: at(0.5), to: at(2) } };
}
