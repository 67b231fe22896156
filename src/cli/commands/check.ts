import type { CommandDef } from './types.js';
import { addOutputOptions, loadSurveyArg, outputOptions, printWarnings, surveyLoader } from './common.js';
import { Outputs, renderText } from '../io.js';
import { csvText } from '../../render/csv.js';
import { printable } from '../../errors.js';

export const checkCommand: CommandDef = {
  name: 'check',
  description: 'validate a survey file and print it normalised (plain numbers in stated units)',
  configure(cmd) {
    cmd.argument('<survey>', 'survey file (YAML)');
    addOutputOptions(cmd);
  },
  async action(cmd, args, io) {
    const file = args[0] as string;
    const opts = outputOptions(cmd.opts());
    const outputs = new Outputs(io, { out: opts.out });
    outputs.refuseInputs([file]);
    const survey = await loadSurveyArg(io, file);
    outputs.refuseInputs(survey.inputs ?? []);
    const { describeSurvey } = await surveyLoader();
    // (loadSurveyArg checks a plan section as plan and report read it)
    const { surveyWarnings } = await import('../../population/warnings.js');
    const { predictionWarnings } = await import('../../counts/warnings.js');
    const { mergeWarnings } = await import('../../warnings.js');
    const { checkText } = await import('../../render/check-text.js');
    // What can be said without counting: implausible values, the band against Lyman alpha, windows outside the slices.
    const warnings = mergeWarnings(surveyWarnings(survey), predictionWarnings(survey));
    printWarnings(io, warnings);
    const view = describeSurvey(survey);
    const flat = flatten(view);
    outputs.setMain(
      renderText(opts, {
        json: () => ({ ...view, warnings }),
        table: () => checkText(printable(file), survey, view),
        csv: () => csvText(['key', 'value'], Object.entries(flat)),
      }),
    );
    outputs.commit();
    return 0;
  },
};

function flatten(obj: unknown, prefix = '', out: Record<string, string> = {}): Record<string, string> {
  if (obj !== null && typeof obj === 'object' && !Array.isArray(obj)) {
    for (const [k, v] of Object.entries(obj)) flatten(v, prefix ? `${prefix}.${k}` : k, out);
  } else {
    out[prefix] = typeof obj === 'string' ? obj : JSON.stringify(obj);
  }
  return out;
}
