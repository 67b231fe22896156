/**
 * The TypeScript type of every JSON output, generated from its JSON Schema in specs/ (one
 * definition per output: the schema is the contract, the type follows it). Writes
 * src/model/outputs/<name>.ts for each output and src/model/outputs/shared.ts for the blocks
 * several outputs hold (the cosmology, the assumed model); the warning block is the hand-written
 * `Warning` of src/warnings.ts (test/cli/warnings.test.ts keeps its codes equal to the schemas').
 *
 * Run after every change to an output schema:  npx tsx scripts/generate-output-types.ts
 * test/model/outputs.test.ts fails while a generated file is out of date.
 *
 * json-schema-to-typescript compiles each schema with these rules: a definition's type is named
 * by NAMES (or its key in PascalCase); objects are closed (no index signature unless the schema
 * gives additionalProperties); a shared definition must be identical in every schema that holds it
 * and is written once; a reference to another output's schema (the report's) is that output's type.
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { compile, type Options } from 'json-schema-to-typescript';

const SPECS = new URL('../specs/', import.meta.url);
export const OUTPUT_DIR = new URL('../src/model/outputs/', import.meta.url);

/** Each output: its schema (specs/<schema>.schema.json) and the name of its type. */
export const OUTPUTS = [
  { schema: 'prediction', type: 'Prediction' },
  { schema: 'distances', type: 'DistanceTable' },
  { schema: 'clustering', type: 'ClusteringTable' },
  { schema: 'forecast', type: 'Forecast' },
  { schema: 'compare', type: 'Comparison' },
  { schema: 'plan', type: 'Plan' },
  { schema: 'check', type: 'SurveyCheck' },
  { schema: 'report', type: 'ReportJson' },
] as const;

/** Names of definitions whose key alone would say too little. */
const NAMES: Record<string, string> = {
  prediction_base: 'PredictionBase',
  redshift_breakdown: 'RedshiftBreakdown',
  observed_breakdown: 'ObservedBreakdown',
  slice: 'PredictionSlice',
  totals: 'PredictionTotals',
  uncertainty: 'UncertaintyBlock',
  histogram: 'Histogram',
  luminosity_density: 'LuminosityDensity',
  sfr_density: 'SfrDensity',
  line_flux_detection: 'LineFluxDetectionBlock',
  magnitude_detection: 'MagnitudeDetectionBlock',
  threshold_detection: 'ThresholdDetectionBlock',
  fisherBlock: 'FisherBlock',
  byParameter: 'ByParameter',
  matrix: 'Matrix',
  design: 'PlanDesign',
  tier: 'PlanTier',
  view: 'ParameterView',
  omitted: 'OmittedSection',
  population_prediction: 'PopulationPrediction',
  observed_bins: 'ObservedBins',
  observed_bin: 'ObservedBin',
  mocks: 'MocksBlock',
  mock_summary: 'MockParameterSummary',
  requirement: 'Requirement',
  requirement_entry: 'RequirementEntry',
  forecast_slice: 'ForecastSlice',
  compared_survey: 'ComparedSurvey',
  distance_row: 'DistanceRow',
  clustering_row: 'ClusteringRow',
  population_view: 'PopulationView',
  model_spread: 'ModelSpread',
  density_spread: 'DensitySpread',
  histogram_spread: 'HistogramSpread',
  percentiles: 'Percentiles',
  // shared
  cosmology: 'CosmologyBlock',
  model: 'ModelDescription',
  parameter: 'ParameterDescription',
  ztable: 'ZTable',
  range: 'RedshiftRange',
  completeness: 'CompletenessBlock',
  selection: 'SelectionBlock',
  model_uncertainty: 'ModelUncertaintyBlock',
};

/** Definitions several outputs hold: written once, in shared.ts. */
const SHARED = ['cosmology', 'model', 'parameter', 'ztable', 'range', 'completeness', 'selection', 'model_uncertainty'];

/** References to other outputs' schemas (the report's sections) and the types they stand for. */
const OTHER_OUTPUTS: Record<string, { type: string; module: string }> = {
  'prediction.schema.json': { type: 'Prediction', module: './prediction.js' },
  'urn:skytally:forecast:1': { type: 'Forecast', module: './forecast.js' },
  'plan.schema.json': { type: 'Plan', module: './plan.js' },
};

const OPTIONS: Partial<Options> = {
  additionalProperties: false,
  strictIndexSignatures: false,
  ignoreMinAndMaxItems: true,
  unreachableDefinitions: true,
  declareExternallyReferenced: true,
  format: true,
  style: { singleQuote: true, printWidth: 120 },
};

type Json = Record<string, unknown>;

const pascal = (key: string): string =>
  NAMES[key] ?? key.replace(/(^|_)([a-z])/g, (_m, _s, c: string) => c.toUpperCase());

function readSchema(name: string): Json {
  return JSON.parse(readFileSync(new URL(`${name}.schema.json`, SPECS), 'utf8')) as Json;
}

/**
 * A copy of `node` where references to shared definitions, the warning and other outputs become
 * named TypeScript types (tsType), and a $ref's sibling annotations are dropped (so that the
 * referenced type is reused, not copied under a new name). `used` collects the names referred to.
 */
function rewrite(node: unknown, used: Set<string>, keepShared: boolean): unknown {
  if (Array.isArray(node)) return node.map((x) => rewrite(x, used, keepShared));
  if (typeof node !== 'object' || node === null) return node;
  const o = node as Json;
  if (typeof o.$ref === 'string') {
    const ref = o.$ref;
    const local = /^#\/\$defs\/(.+)$/.exec(ref)?.[1];
    if (local === 'warning') {
      used.add('Warning');
      return { tsType: 'Warning' };
    }
    if (local !== undefined && SHARED.includes(local) && !keepShared) {
      used.add(pascal(local));
      return { tsType: pascal(local) };
    }
    const other = OTHER_OUTPUTS[ref];
    if (other) {
      used.add(other.type);
      return { tsType: other.type };
    }
    return { $ref: ref };
  }
  const out: Json = {};
  for (const [k, v] of Object.entries(o))
    out[k] = k === 'description' || k === 'title' ? v : rewrite(v, used, keepShared);
  return out;
}

function named(defs: Json): Json {
  return Object.fromEntries(Object.entries(defs).map(([k, v]) => [k, { ...(v as Json), title: pascal(k) }]));
}

/** Without the generator's note on where each definition was referenced from (it names the synthetic holder). */
function tidy(ts: string): string {
  return ts
    .replace(
      /\n \*\n \* This interface was referenced by `[^`]+`'s JSON-Schema\n \* via the `definition` "[^"]+"\./g,
      '',
    )
    .replace(
      /\/\*\*\n \* This interface was referenced by `[^`]+`'s JSON-Schema\n \* via the `definition` "[^"]+"\.\n \*\/\n/g,
      '',
    );
}

const BANNER = (source: string): string =>
  `/* Generated from ${source} by scripts/generate-output-types.ts: do not edit (run \`npx tsx scripts/generate-output-types.ts\`). */`;

/** Every generated module: file name in src/model/outputs/ -> its text. */
export async function generateOutputTypes(): Promise<Map<string, string>> {
  const files = new Map<string, string>();
  const shared: Json = {};
  for (const { schema, type } of OUTPUTS) {
    const s = readSchema(schema);
    const defs = { ...((s.$defs as Json | undefined) ?? {}) };
    for (const k of SHARED) {
      if (!(k in defs)) continue;
      if (k in shared && JSON.stringify(shared[k]) !== JSON.stringify(defs[k])) {
        throw new Error(
          `specs/${schema}.schema.json: the definition "${k}" differs from the other schemas'; keep them identical`,
        );
      }
      shared[k] = defs[k];
      delete defs[k];
    }
    delete defs.warning;
    const used = new Set<string>();
    const body = rewrite({ ...s, $defs: named(defs) }, used, false) as Json;
    delete body.$id;
    body.title = type;
    const ts = await compile(body, type, { ...OPTIONS, bannerComment: '', cwd: SPECS.pathname });
    const imports: string[] = [];
    if (used.delete('Warning')) imports.push(`import type { Warning } from '../../warnings.js';`);
    for (const [, other] of Object.entries(OTHER_OUTPUTS)) {
      if (used.delete(other.type)) imports.push(`import type { ${other.type} } from '${other.module}';`);
    }
    if (used.size > 0) {
      // one line up to the print width, else one name per line (as prettier writes it)
      const names = [...used].sort();
      const line = `import type { ${names.join(', ')} } from './shared.js';`;
      imports.push(
        line.length <= 120 ? line : `import type {\n${names.map((n) => `  ${n},`).join('\n')}\n} from './shared.js';`,
      );
    }
    files.set(
      `${schema}.ts`,
      `${BANNER(`specs/${schema}.schema.json`)}\n${imports.join('\n')}${imports.length ? '\n\n' : ''}${tidy(ts)}`,
    );
  }
  const used = new Set<string>();
  const sharedSchema = rewrite(
    { title: 'SharedBlocks', type: 'object', properties: {}, $defs: named(shared) },
    used,
    true,
  ) as Json;
  let sharedTs = await compile(sharedSchema, 'SharedBlocks', { ...OPTIONS, bannerComment: '' });
  // the empty holder object is only the carrier of the definitions
  sharedTs = sharedTs.replace(/export interface SharedBlocks \{\}\n\n?/, '');
  files.set('shared.ts', `${BANNER('the definitions several schemas of specs/ hold')}\n${tidy(sharedTs)}`);
  return files;
}

if (import.meta.url === `file://${process.argv[1]}`) {
  for (const [name, text] of await generateOutputTypes()) writeFileSync(new URL(name, OUTPUT_DIR), text);
}
