/**
 * The lines that state what a prediction assumed (its title, the survey, the cosmology, each
 * population's model, the photometric redshifts): the head of predict's table and the explore
 * page's statement of the model, kept apart from the table code (cli-table3), which the page does
 * not carry.
 */
import type { Prediction } from '../model/outputs/prediction.js';
import type { CosmologyBlock } from '../model/outputs/shared.js';
import { detectionLine } from './detection-text.js';
import { sig, zText } from './format.js';

export function cosmologyLine(c: CosmologyBlock): string {
  const base = `flat Lambda-CDM, H0 = ${sig(c.h0)} km/s/Mpc, Omega_m = ${sig(c.omega_m)}, Omega_Lambda = ${sig(c.omega_lambda, 6)}, T_cmb = ${sig(c.t_cmb, 6)} K`;
  return c.preset ? `${base} (preset ${c.preset}: ${c.preset_source})` : base;
}

export function predictionHeader(p: Prediction): string[] {
  const lines = [
    p.title,
    `Survey: ${sig(p.area_deg2)} deg^2, z = ${zText(p.redshift.min)} to ${zText(p.redshift.max)}${p.breakdown === 'observed' ? ' (each population over its own window)' : ''}, ${detectionLine(p)}${p.detection.completeness ? ', with completeness' : ''}`,
    `Cosmology: ${cosmologyLine(p.cosmology)}`,
  ];
  for (const m of p.models) lines.push(`Assumed model: ${m.summary}`);
  const pz = photoZLine(p);
  if (pz) lines.push(pz);
  return lines;
}

/** With photometric redshifts: what the slices are, how far true redshifts reach, what is lost. */
export function photoZLine(p: Prediction): string | undefined {
  const m = p.photo_z;
  if (!m) return undefined;
  // From the matrix: sources truly in the window measured outside it, and sources from outside measured in it.
  const n = m.true_counts.length - 1;
  let inside = 0;
  let out = 0;
  let scatteredIn = 0;
  for (let i = 1; i < n; i++) {
    inside += m.true_counts[i]!;
    out += m.migration_matrix[i]![0]! + m.migration_matrix[i]![n]!;
    scatteredIn += m.migration_matrix[0]![i]! + m.migration_matrix[n]![i]!;
  }
  const lost = inside > 0 ? ` (${pct(out / inside)})` : '';
  return (
    `Photometric redshifts: sigma = ${sig(m.sigma)} (1 + z), outlier fraction ${sig(m.outlier_fraction)}; the slices are slices in MEASURED redshift ` +
    `(count; "true-z count": sources whose true redshift lies in the slice); true redshifts integrated over z = ${zText(m.true_range.min)} to ${zText(m.true_range.max)} ` +
    `(${m.reach_sigma} sigma beyond the window); of the sources truly in the window ${sig(out, 4)}${lost} are measured outside it and lost, ` +
    `and ${sig(scatteredIn, 4)} from outside it are measured in it. ` +
    // (a whole-window slice can then show a larger +/- than the total: not an error)
    `A slice's +/- takes the cosmic variance of its measured-redshift box, an upper bound (its sources spread over more depth); ` +
    `the total's takes the sources' true redshifts.`
  );
}

/** A share in per cent, 3 significant figures. */
function pct(x: number): string {
  return `${sig(100 * x, 3)}%`;
}
