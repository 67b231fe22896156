/**
 * A survey file's page controls as the explore command makes them: the file read, parsed (`name`
 * in messages) and loaded, and the controls built from both.
 */
import { readFileSync } from 'node:fs';
import { parseYaml } from '../../src/survey/yaml.js';
import { loadSurveyText } from '../../src/survey/load.js';
import { exploreControls } from '../../src/library/explore/settings.js';

export function sampleControls(path: string, name = path) {
  const text = readFileSync(path, 'utf8');
  const raw = parseYaml(text, name);
  const controls = exploreControls(raw, loadSurveyText(text, path));
  return { text, raw, controls };
}
