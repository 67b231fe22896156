/**
 * `skytally explore FILE`: the survey file read once, its controls, the page's first state
 * computed here, the files the survey names (transmission tables) embedded, and the page script
 * (the engine bundled for browsers by scripts/explore-bundle.mjs: dist/explore-page.js in the
 * package, or the bundle SKYTALLY_EXPLORE_SCRIPT names when the sources run) inlined: one HTML
 * file that needs nothing else (docs/outputs.md, "explore").
 */
import { readFileSync } from 'node:fs';
import { basename, dirname, isAbsolute, posix, relative } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { Survey } from '../../model/survey.js';
import { parseYaml } from '../../survey/yaml.js';
import { loadSurveyFileWithText } from '../../survey/load.js';
import { explorePageHtml } from '../../render/explore/page.js';
import { exploreControls } from './settings.js';
import { exploreCompute } from './engine.js';
import { checkText } from '../../model/arguments.js';

export const EXPLORE_SCRIPT_VARIABLE = 'SKYTALLY_EXPLORE_SCRIPT';

/** Where the page believes the survey file lies: the files it names are embedded under it. */
export const PAGE_BASE_DIR = '/survey';

/**
 * The bundled page script: SKYTALLY_EXPLORE_SCRIPT when set, else the package's
 * dist/explore-page.js; without its source-map comment (the page has no file beside it).
 */
export function explorePageScript(): string {
  const given = process.env[EXPLORE_SCRIPT_VARIABLE];
  if (!given && import.meta.url.endsWith('.ts')) {
    throw new Error(
      `the explore page needs its bundled script: build the package, or set ${EXPLORE_SCRIPT_VARIABLE} to a bundle made by scripts/explore-bundle.mjs`,
    );
  }
  const text = readFileSync(given || fileURLToPath(import.meta.resolve('#explore-page')), 'utf8');
  return text.replace(/\n\/\/# sourceMappingURL=\S+\s*$/, '\n');
}

/**
 * The page for a survey file already loaded: `path` as given, `text` the file as written,
 * `survey` what the loader made of it (its inputs name the files to embed).
 */
export async function buildExplorePage(
  path: string,
  text: string,
  survey: Survey,
  script = explorePageScript(),
): Promise<string> {
  const file = basename(path);
  const dir = dirname(path);
  const files: Record<string, string> = {};
  for (const input of (survey.inputs ?? []).slice(1)) {
    const body = readFileSync(input.path, 'utf8').replace(/^\uFEFF/, '');
    const rel = relative(dir, input.path).split('\\').join('/');
    files[posix.resolve(PAGE_BASE_DIR, rel)] = body;
    if (isAbsolute(input.path)) files[input.path] = body;
  }
  const controls = exploreControls(parseYaml(text, file), survey);
  const result = await exploreCompute({ text }, file, dir);
  return explorePageHtml({
    title: survey.title,
    fileName: file,
    controls,
    result,
    data: { file, baseDir: PAGE_BASE_DIR, text, files, controls },
    script,
  });
}

/** The explore page of a survey file (read once, through the loader's checks), as HTML text. */
export async function explorePage(path: string): Promise<string> {
  checkText(path, 'explorePage', 'the path of a survey file', '"samples/halpha-narrowband.yaml"');
  const { survey, text } = loadSurveyFileWithText(path);
  return buildExplorePage(path, text, survey);
}
