/**
 * The user documentation in docs/ kept in step with the program: every key of the survey-file
 * schemas is documented in docs/survey-file.md, every top-level field of every JSON output in
 * docs/outputs.md, every command and option in docs/names.md, every warning code in both
 * docs/outputs.md and docs/names.md; every complete example file in the documents (and README's)
 * loads; every link between the documents leads somewhere. A name counts as documented only when
 * it is written as code (between backticks), so that a word of the prose does not pass for it.
 */
import { describe, expect, test } from 'vitest';
import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { Command } from 'commander';
import { COMMANDS } from '../../src/cli/commands/index.js';
import { WARNING_CODES } from '../../src/warnings.js';
import { loadSurveyText } from '../../src/survey/index.js';

const read = (path: string) => readFileSync(path, 'utf8');
const SURVEY_FILE_MD = 'docs/survey-file.md';
const OUTPUTS_MD = 'docs/outputs.md';
const NAMES_MD = 'docs/names.md';
const DOCS = [SURVEY_FILE_MD, OUTPUTS_MD, NAMES_MD];

/** Every word written as code in a Markdown text: the pieces of each `code span` and fenced block. */
function codeWords(markdown: string): Set<string> {
  const words = new Set<string>();
  const add = (code: string) => {
    for (const w of code.split(/[^A-Za-z0-9_-]+/)) if (w) words.add(w);
  };
  const withoutFences = markdown.replace(/```[^\n]*\n([\s\S]*?)```/g, (_, body: string) => {
    add(body);
    return '';
  });
  for (const m of withoutFences.matchAll(/`([^`\n]+)`/g)) add(m[1]!);
  return words;
}

function missingFrom(markdown: string, names: Iterable<string>): string[] {
  const words = codeWords(markdown);
  return [...new Set(names)].filter((n) => !words.has(n)).sort();
}

/** Every property name anywhere in a JSON Schema (nested objects, items, $defs, if/then/else). */
function propertyNames(schema: unknown, out = new Set<string>()): Set<string> {
  if (Array.isArray(schema)) {
    for (const s of schema) propertyNames(s, out);
  } else if (schema !== null && typeof schema === 'object') {
    const o = schema as Record<string, unknown>;
    if (o.properties && typeof o.properties === 'object') {
      for (const k of Object.keys(o.properties)) out.add(k);
    }
    for (const v of Object.values(o)) propertyNames(v, out);
  }
  return out;
}

const schema = (file: string): Record<string, unknown> =>
  JSON.parse(read(join('specs', file))) as Record<string, unknown>;

/** The output schemas: every schema in specs/ but the two that describe the survey file. */
const OUTPUT_SCHEMAS = readdirSync('specs')
  .filter((f) => f.endsWith('.schema.json') && f !== 'survey.schema.json' && f !== 'plan-section.schema.json')
  .sort();

describe('docs/survey-file.md documents the survey file', () => {
  test.each(['survey.schema.json', 'plan-section.schema.json'])('every key of specs/%s', (file) => {
    const keys = propertyNames(schema(file));
    expect(keys.size).toBeGreaterThan(file === 'survey.schema.json' ? 50 : 15);
    expect(missingFrom(read(SURVEY_FILE_MD), keys)).toEqual([]);
    // names.md holds every name a user sees, survey-file keys included
    expect(missingFrom(read(NAMES_MD), keys)).toEqual([]);
  });

  test('every value a key may take from a fixed list (kinds, profiles, shapes, presets, goals)', () => {
    const values = new Set<string>();
    const walk = (s: unknown) => {
      if (Array.isArray(s)) s.forEach(walk);
      else if (s !== null && typeof s === 'object') {
        const o = s as Record<string, unknown>;
        if (Array.isArray(o.enum)) for (const v of o.enum) if (typeof v === 'string') values.add(v);
        Object.values(o).forEach(walk);
      }
    };
    walk(schema('survey.schema.json'));
    walk(schema('plan-section.schema.json'));
    for (const preset of ['planck2018', 'planck2015', 'auto']) values.add(preset);
    expect(values.size).toBeGreaterThan(15);
    expect(missingFrom(read(SURVEY_FILE_MD), values)).toEqual([]);
  });

  test('every complete example (a YAML block starting with format: 1) loads', () => {
    const examples = yamlExamples(read(SURVEY_FILE_MD));
    expect(examples.length).toBeGreaterThanOrEqual(4);
    // filter paths in the examples are relative to samples/, where the invented filter lies; an
    // example whose files are not there names them relative to test/fixtures/ (an invented spectrum)
    for (const [i, text] of examples.entries()) {
      const files = [...text.matchAll(/\bfile: ([^\s},#]+)/g)].map((m) => m[1]!);
      const base = files.every((f) => existsSync(join('samples', f))) ? 'samples' : 'test/fixtures';
      expect(() => loadSurveyText(text, `${SURVEY_FILE_MD} example ${i + 1}`, base), `example ${i + 1}`).not.toThrow();
    }
  });
});

/**
 * The top-level fields of an output: its properties, or those of every variant of a union (the
 * prediction is one of two breakdowns, each the common fields and its own).
 */
function topLevelFields(s: { properties?: object; $defs?: Record<string, unknown> }): string[] {
  type Node = { $ref?: string; properties?: object; allOf?: Node[]; oneOf?: Node[] };
  const out = new Set<string>();
  const visit = (node: Node): void => {
    const x = node.$ref ? (s.$defs?.[node.$ref.replace('#/$defs/', '')] as Node) : node;
    Object.keys(x.properties ?? {}).forEach((k) => out.add(k));
    (x.allOf ?? []).forEach(visit);
    (x.oneOf ?? []).forEach(visit);
  };
  visit(s);
  return [...out];
}

describe('docs/outputs.md documents every output', () => {
  test('the output schemas are the ones expected', () => {
    expect(OUTPUT_SCHEMAS).toEqual(
      expect.arrayContaining(['prediction.schema.json', 'forecast.schema.json', 'report.schema.json']),
    );
  });

  test.each(OUTPUT_SCHEMAS)('every top-level field of specs/%s, and a link to it', (file) => {
    const s = schema(file);
    const fields = topLevelFields(s);
    expect(fields.length).toBeGreaterThan(2);
    const text = read(OUTPUTS_MD);
    expect(missingFrom(text, fields)).toEqual([]);
    expect(missingFrom(read(NAMES_MD), fields)).toEqual([]);
    expect(text).toContain(`(../specs/${file})`);
  });

  test('every field of the predict, clustering, forecast, compare, plan and report outputs, nested ones too', () => {
    const text = read(OUTPUTS_MD);
    for (const file of [
      'prediction.schema.json',
      'clustering.schema.json',
      'forecast.schema.json',
      'compare.schema.json',
      'plan.schema.json',
      'report.schema.json',
    ]) {
      expect(missingFrom(text, propertyNames(schema(file))), file).toEqual([]);
    }
  });
});

describe('docs/names.md names every command and option', () => {
  const registered = COMMANDS.map((def) => {
    const cmd = new Command(def.name);
    def.configure(cmd);
    return {
      name: def.name,
      options: cmd.options.map((o) => o.long).filter((l): l is string => typeof l === 'string'),
    };
  });

  test('the commands', () => {
    expect(registered.length).toBeGreaterThanOrEqual(8);
    expect(
      missingFrom(
        read(NAMES_MD),
        registered.map((c) => c.name),
      ),
    ).toEqual([]);
  });

  test.each(COMMANDS.map((c) => c.name))('the options of %s', (name) => {
    const options = registered.find((c) => c.name === name)!.options;
    expect(options).toContain('--out');
    expect(missingFrom(read(NAMES_MD), options)).toEqual([]);
  });

  test.each(COMMANDS.map((c) => c.name))(
    "README's table of commands gives %s with every option (but --format and --out, stated once below it)",
    (name) => {
      const row = read('README.md')
        .split('\n')
        .find((l) => l.startsWith(`| \`skytally ${name} `));
      expect(row, `README's row of ${name}`).toBeDefined();
      const synopsis = row!.split('` |')[0]!;
      const options = registered.find((c) => c.name === name)!.options.filter((o) => o !== '--format' && o !== '--out');
      expect(options.filter((o) => !new RegExp(`${o}(?![a-z-])`).test(synopsis))).toEqual([]);
    },
  );
});

describe('warning codes', () => {
  const codes = Object.keys(WARNING_CODES);
  test.each([OUTPUTS_MD, NAMES_MD])('every code of src/warnings.ts is in %s', (doc) => {
    expect(codes.length).toBeGreaterThanOrEqual(6);
    expect(missingFrom(read(doc), codes)).toEqual([]);
  });
});

describe('links', () => {
  test.each([...DOCS, 'README.md'])('every relative link of %s leads to a file and a heading that exist', (doc) => {
    const text = read(doc);
    const links = [...text.matchAll(/\]\(([^)\s]+)\)/g)].map((m) => m[1]!).filter((l) => !/^[a-z]+:/.test(l));
    expect(links.length).toBeGreaterThan(0);
    for (const link of links) {
      const [path, anchor] = link.split('#');
      const target = path ? resolve(dirname(doc), path) : resolve(doc);
      expect(existsSync(target), `${doc}: ${link}`).toBe(true);
      if (anchor && target.endsWith('.md')) expect(headingAnchors(read(target)), `${doc}: ${link}`).toContain(anchor);
    }
  });

  test('README links the three documents and keeps one complete example that loads', () => {
    const readme = read('README.md');
    for (const doc of DOCS) expect(readme).toContain(`](${doc})`);
    const examples = yamlExamples(readme);
    expect(examples.length).toBeGreaterThanOrEqual(1);
    for (const text of examples) expect(() => loadSurveyText(text, 'README.md example', 'samples')).not.toThrow();
  });
});

describe('the repository explains itself', () => {
  // Common practice for a project's own documentation: a comment, test or document that cites a
  // Markdown file cites one that ships with the repository, never notes kept beside it.
  test('every Markdown file named in src/, test/, scripts/, docs/, README.md and DEVELOPERS.md is in the repository', () => {
    const shipped = new Set<string>();
    const texts: [string, string][] = [];
    const walk = (dir: string) => {
      for (const e of readdirSync(dir, { withFileTypes: true })) {
        const path = join(dir, e.name);
        if (e.isDirectory()) walk(path);
        else if (/\.(ts|mts|mjs|cjs|js|md|py|json|yaml|sh)$/.test(e.name)) {
          if (e.name.endsWith('.md')) shipped.add(e.name);
          if (e.name !== 'durations.json') texts.push([path, read(path)]);
        }
      }
    };
    for (const dir of ['src', 'test', 'scripts', 'docs', 'samples', '.ci']) walk(dir);
    for (const doc of ['README.md', 'DEVELOPERS.md']) {
      shipped.add(doc);
      texts.push([doc, read(doc)]);
    }
    const cited: string[] = [];
    for (const [path, text] of texts) {
      for (const m of text.matchAll(/([A-Za-z0-9_-]+)\.md\b/g))
        if (!shipped.has(`${m[1]!}.md`)) cited.push(`${path}: ${m[0]}`);
      if (text.includes('../shared') && path !== join('test', 'docs', 'docs.test.ts')) cited.push(`${path}: ../shared`);
    }
    expect(texts.length).toBeGreaterThan(100);
    expect(cited).toEqual([]);
  });
});

/** The YAML blocks that are whole survey files (their first line is `format: 1`). */
function yamlExamples(markdown: string): string[] {
  return [...markdown.matchAll(/```yaml\n([\s\S]*?)```/g)].map((m) => m[1]!).filter((t) => /^format: 1\b/.test(t));
}

/** The anchors GitHub gives a document's headings: lower case, punctuation dropped, spaces as '-'. */
function headingAnchors(markdown: string): string[] {
  return [...markdown.replace(/```[\s\S]*?```/g, '').matchAll(/^#{1,6} (.+)$/gm)].map((m) =>
    m[1]!
      .trim()
      .toLowerCase()
      .replace(/[^a-z0-9 _-]/g, '')
      .replace(/ /g, '-'),
  );
}
