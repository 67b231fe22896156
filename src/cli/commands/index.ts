/** Every command of the program, in the order `--help` lists them. Add a new command here. */
import type { CommandDef } from './types.js';
import { predictCommand } from './predict.js';
import { checkCommand } from './check.js';
import { distancesCommand } from './distances.js';
import { clusteringCommand } from './clustering.js';
import { forecastCommand } from './forecast.js';
import { compareCommand } from './compare.js';
import { planCommand } from './plan.js';
import { reportCommand } from './report.js';
import { exploreCommand } from './explore.js';

export const COMMANDS: CommandDef[] = [
  predictCommand,
  checkCommand,
  distancesCommand,
  clusteringCommand,
  forecastCommand,
  compareCommand,
  planCommand,
  reportCommand,
  exploreCommand,
];
