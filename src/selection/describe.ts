/**
 * The selection block of every output's model statement and of `check` (specs/*.schema.json,
 * $defs.selection): which selection effects a population uses, whether attenuation was applied,
 * and each effect as written and at the window's middle.
 */
import type { Detection } from '../model/detection.js';
import type { Population } from '../model/population.js';
import type { Survey } from '../model/survey.js';
import { populationPath } from '../model/select.js';
import type { EquivalentWidthDistribution } from '../model/selection.js';
import type { SelectionBlock } from '../model/outputs/shared.js';
import { selectionEffects } from './effects.js';

function words(d: EquivalentWidthDistribution): string {
  if (d.model === 'exponential') return `exponential, scale ${d.scaleAngstrom} Angstrom`;
  if (d.model === 'lognormal') return `lognormal, median ${d.medianAngstrom} Angstrom, sigma ${d.sigmaDex} dex`;
  return `table of the fraction above ${d.widthAngstrom.length} widths from ${d.widthAngstrom[0]} to ${d.widthAngstrom[d.widthAngstrom.length - 1]} Angstrom`;
}

export function describeSelection(detection: Detection, p: Population): SelectionBlock {
  const zMid = 0.5 * (p.window.min + p.window.max);
  const block: SelectionBlock = { effects: [], attenuation_applied: p.attenuation !== undefined };
  const sel = p.redshiftSelection ?? detection.redshiftSelection;
  if (sel) {
    block.effects.push('redshift_selection');
    block.redshift_selection = {
      from: p.redshiftSelection ? 'population' : 'detection',
      fraction: { given: sel.source, at_window_middle: sel.at(zMid) },
    };
  }
  if (p.blendRatio !== undefined) {
    block.effects.push('blend_ratio');
    const b = p.blendRatio;
    // a number as it was given; a table or an expression as written and at the window's middle
    block.blend_ratio = typeof b.source === 'number' ? b.source : { given: b.source, at_window_middle: b.at(zMid) };
  }
  if (p.blendedLines) {
    block.effects.push('blended_lines');
    block.blended_lines = p.blendedLines.map((b) => ({ line_angstrom: b.restAngstrom, ratio: b.ratio }));
  }
  if (p.attenuation) {
    block.effects.push('attenuation');
    block.attenuation_mag = { given: p.attenuation.source, at_window_middle: p.attenuation.at(zMid) };
  }
  const cut = detection.equivalentWidthCut;
  if (cut && p.equivalentWidths) {
    block.effects.push('equivalent_width_cut');
    block.equivalent_width_cut = {
      frame: cut.frame,
      width_angstrom: cut.angstrom,
      distribution: words(p.equivalentWidths),
      kept_at_window_middle: selectionEffects(detection, p).equivalentWidthKept(zMid),
    };
  }
  if (p.validRedshift) block.valid_redshift = { ...p.validRedshift };
  return block;
}

/**
 * The keys of the selection that can leave no source where the limit alone would leave some (a
 * redshift selection of 0, a deep attenuation, a high equivalent-width cut), as the file names
 * them, for the populations `which` of `survey` (default every one), after `lead`
 * (", or the selection (...)"): a message about a survey that counts nothing names them beside the
 * limit and the area. "" without any.
 */
export function removingSelectionHint(
  survey: Survey,
  which: readonly Population[] = survey.populations,
  lead = 'or the selection',
): string {
  const detection = survey.detection;
  const keys: string[] = [];
  for (const p of which) {
    const path = populationPath(survey, p);
    if (p.redshiftSelection) keys.push(`${path}.redshift_selection`);
    else if (detection.redshiftSelection) keys.push('detection.redshift_selection');
    if (p.attenuation) keys.push(`${path}.attenuation`);
  }
  if (detection.equivalentWidthCut) keys.push('detection.equivalent_width_cut');
  const unique = [...new Set(keys)];
  return unique.length > 0 ? `, ${lead} (${unique.join(', ')})` : '';
}
