/**
 * What every `data-output` of the explore page must equal: the JSON of `skytally predict` and
 * `skytally forecast` run (through the command path) on the survey file the page writes
 * (docs/outputs.md, "explore", names each output and the field it is).
 */
import { expect } from 'vitest';
import { runCli } from '../cli/helpers.js';
import { sampleCommand } from '../support/sample-commands.js';

interface Block {
  poisson_fraction: number;
  cosmic_variance_fraction: number;
  total_fraction: number;
}
interface Slice {
  count: number;
  uncertainty?: Block;
  model?: { fraction: number };
}
interface PredictJson {
  breakdown: 'redshift' | 'observed';
  totals: { count: number; per_deg2: number; uncertainty?: Block; model?: { fraction: number } };
  slices?: Slice[];
  populations: { slices: Slice[] }[];
}

/** data-output name -> the number the commands give for it. */
export async function expectedOutputs(file: string, cwd?: string): Promise<Map<string, number>> {
  // a bundled sample's output is run once per worker and shared (test/support/sample-commands.ts)
  const command = (argv: string[]) =>
    cwd === undefined && /^samples\/[^/]+\.yaml$/.test(file) ? sampleCommand(argv) : runCli(argv, cwd);
  const p = await command(['predict', file, '--format', 'json']);
  expect(p.code, p.stderr).toBe(0);
  const j = JSON.parse(p.stdout) as PredictJson;
  const out = new Map<string, number>();
  out.set('total-count', j.totals.count);
  out.set('total-per-deg2', j.totals.per_deg2);
  if (j.totals.uncertainty) {
    out.set('total-poisson', j.totals.uncertainty.poisson_fraction);
    out.set('total-cosmic-variance', j.totals.uncertainty.cosmic_variance_fraction);
    out.set('total-uncertainty', j.totals.uncertainty.total_fraction);
  }
  if (j.totals.model) out.set('total-model', j.totals.model.fraction);
  const rows = j.breakdown === 'redshift' ? j.slices! : j.populations.flatMap((q) => q.slices);
  rows.forEach((s, i) => {
    const k = i + 1;
    out.set(`slice-${k}-count`, s.count);
    if (s.uncertainty) {
      out.set(`slice-${k}-poisson`, s.uncertainty.poisson_fraction);
      out.set(`slice-${k}-cosmic-variance`, s.uncertainty.cosmic_variance_fraction);
      out.set(`slice-${k}-uncertainty`, s.uncertainty.total_fraction);
    }
    if (s.model) out.set(`slice-${k}-model`, s.model.fraction);
  });
  const f = await command(['forecast', file, '--format', 'json']);
  if (f.code === 0) {
    const fj = JSON.parse(f.stdout) as {
      fisher: { sigma: Record<string, number> };
      fisher_poisson_only: { sigma: Record<string, number> };
    };
    for (const [n, v] of Object.entries(fj.fisher.sigma)) out.set(`sigma-${n}`, v);
    for (const [n, v] of Object.entries(fj.fisher_poisson_only.sigma)) out.set(`sigma-poisson-${n}`, v);
  }
  return out;
}

/** Relative agreement to 1e-9 (the page runs the same code on the same text: it should be exact). */
export function expectSameOutputs(page: Map<string, number>, expected: Map<string, number>, what: string): void {
  expect([...page.keys()].sort(), what).toEqual([...expected.keys()].sort());
  for (const [name, v] of expected) {
    const got = page.get(name)!;
    expect(Math.abs(got - v), `${what}: ${name} ${got} vs ${v}`).toBeLessThanOrEqual(
      1e-9 * Math.max(Math.abs(v), 1e-300),
    );
  }
}
