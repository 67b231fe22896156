/** The `explore` command: one self-contained HTML page to vary a survey live (src/library/explore/page.ts). */
import { resolve } from 'node:path';
import type { CommandDef } from './types.js';
import { checkPlanSection, printWarnings, refuseHtmlOnTerminal } from './common.js';
import { Outputs } from '../io.js';

export const exploreCommand: CommandDef = {
  name: 'explore',
  description:
    'one self-contained HTML page that recomputes the prediction and the Fisher sigmas as you move the area, the limit, the window and the model',
  configure(cmd) {
    cmd.argument('<survey>', 'survey file (YAML)');
    cmd.option('--out <file>', 'write the page to this file (atomically; - for standard output) instead of stdout');
  },
  async action(cmd, args, io) {
    const file = args[0] as string;
    const opts = cmd.opts<{ out?: string }>();
    refuseHtmlOnTerminal(io, opts.out, 'explore', 'one HTML page of about 2 MB');
    const outputs = new Outputs(io, { out: opts.out });
    outputs.refuseInputs([file]);
    const { loadSurveyFileWithText } = await import('../../survey/load.js');
    const { survey, text } = loadSurveyFileWithText(resolve(io.cwd, file));
    outputs.refuseInputs(survey.inputs ?? []);
    // a plan section as plan reads it: a mistyped plan key is refused, not left out of the page
    // with the exposure-per-pointing control it sets
    await checkPlanSection(survey);
    const { buildExplorePage } = await import('../../library/explore/page.js');
    const html = await buildExplorePage(resolve(io.cwd, file), text, survey);
    const { surveyWarnings } = await import('../../population/warnings.js');
    const { predictionWarnings } = await import('../../counts/predict.js');
    const { mergeWarnings } = await import('../../warnings.js');
    printWarnings(io, mergeWarnings(surveyWarnings(survey), predictionWarnings(survey)));
    outputs.setMain(html);
    outputs.commit();
    return 0;
  },
};
