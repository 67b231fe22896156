/**
 * The command-line parser's refusals, for every command and every kind: a choice not allowed, an
 * option without its value, a required option left out, an unknown option, a missing or an extra
 * argument, an unknown command. Each is bad input in the program's own form (as the --draws range
 * refusal is): exit 2, one line "skytally: <command> <option>: <what>; <what to write>.", naming
 * the command and the option, nothing on stdout and no --out file written. (Failed before:
 * commander's own words, "option '--format <format>' argument 'csv' is invalid. Allowed choices
 * are html, json.", "too many arguments for 'predict'. Expected 1 argument but got 2.")
 * The commands and options are read from the program's own declarations (src/cli/commands), so a
 * new option or command is covered without editing this file.
 */
import { copyFileSync, existsSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { Command, type Option } from 'commander';
import { describe, expect, test } from 'vitest';
import { runCli, type Captured } from './helpers.js';
import { tempDir } from '../support/temp.js';
import { COMMANDS } from '../../src/cli/commands/index.js';
import { inputError } from '../../src/errors.js';

const SURVEY = 'samples/halpha-narrowband.yaml';
const PLAN = 'samples/plan-halpha-layers.yaml';
const dir = tempDir('skytally-refusals-');
let outs = 0;

/** One sentence in the program's form, naming each of `names`; nothing on stdout. */
function refused(r: Captured, names: string[]): string {
  expect(r.code, r.stderr).toBe(2);
  expect(r.stdout).toBe('');
  const lines = r.stderr.split('\n');
  expect(lines, r.stderr).toHaveLength(2); // one line and its end
  const line = lines[0]!;
  expect(line).toMatch(/^skytally: [^\n]+; [^\n]+\.$/);
  // one sentence: no full stop and space before its end (but in "e.g." and "i.e.")
  expect(line.slice(0, -1).replace(/\b(e\.g|i\.e)\./g, '')).not.toMatch(/\.\s/);
  // commander's own words are gone
  expect(line).not.toMatch(/error:|Allowed choices|argument missing|too many arguments|Expected \d|Did you mean/);
  for (const n of names) expect(line, n).toContain(n);
  expect(line).not.toContain('internal failure');
  return line;
}

interface Declared {
  name: string;
  options: readonly Option[];
  args: { name: string; required: boolean; variadic: boolean }[];
}

/** Each command as the program declares it. */
const DECLARED: Declared[] = COMMANDS.map((def) => {
  const cmd = new Command(def.name);
  def.configure(cmd);
  return {
    name: def.name,
    options: cmd.options,
    args: cmd.registeredArguments.map((a) => ({ name: a.name(), required: a.required, variadic: a.variadic })),
  };
});

/** A command line that runs: its arguments and the options it requires, and --out to a fresh file where it has one. */
function valid(c: Declared): { argv: string[]; out?: string } {
  const argv = [c.name];
  for (const a of c.args) {
    if (a.variadic) argv.push(SURVEY, SURVEY);
    else if (a.required) argv.push(c.name === 'plan' ? PLAN : SURVEY);
  }
  for (const o of c.options) if (o.mandatory) argv.push(o.long!, '1');
  if (!c.options.some((o) => o.long === '--out')) return { argv };
  const out = join(dir, `out-${outs++}.txt`);
  return { argv: [...argv, '--out', out], out };
}

function nothingWritten(out: string | undefined): void {
  if (out) expect(existsSync(out), out).toBe(false);
}

/** [command, option] pairs: options with choices, options that take a value, options required. */
const pairs = (keep: (o: Option) => boolean): [Declared, Option][] =>
  DECLARED.flatMap((c) => c.options.filter(keep).map((o): [Declared, Option] => [c, o]));
const label = ([c, o]: [Declared, Option]) => `${c.name} ${o.long!}`;
const WITH_CHOICES = pairs((o) => (o.argChoices?.length ?? 0) > 0);
const WITH_VALUE = pairs((o) => o.required);
const MANDATORY = pairs((o) => o.mandatory);

describe('options: the parser refuses in the program form', () => {
  test('the program has options of each kind (so that no test below is empty)', () => {
    expect(WITH_CHOICES.map(label)).toContain('report --format');
    expect(WITH_VALUE.map(label)).toContain('predict --out');
    expect(MANDATORY.map(label)).toEqual(['distances --z', 'clustering --z']);
  });

  test.each(WITH_CHOICES.map((p) => [label(p), ...p] as const))(
    '%s: a value outside its choices names the command, the option and every choice',
    async (_, c, o) => {
      const { argv, out } = valid(c);
      const line = refused(await runCli([...argv, o.long!, 'no-such-choice']), [
        `${c.name} ${o.long!}:`,
        '"no-such-choice"',
        ...o.argChoices!.map((x) => `${o.long!} ${x}`),
      ]);
      expect(line).toMatch(/; write /);
      nothingWritten(out);
    },
  );

  test.each(WITH_VALUE.map((p) => [label(p), ...p] as const))(
    '%s given without its value: the command, the option and how to write it',
    async (_, c, o) => {
      const { argv, out } = valid(c);
      // the option last with no value after it (without the --out or mandatory value given before)
      const rest = argv.filter((a, i) => !(a === o.long || argv[i - 1] === o.long));
      const line = refused(await runCli([...rest, o.long!]), [
        `${c.name} ${o.long!}: needs a value after it`,
        `write ${o.long!}`,
      ]);
      expect(line).not.toContain('undefined');
      nothingWritten(o.long === '--out' ? undefined : out);
    },
  );

  test.each(MANDATORY.map((p) => [label(p), ...p] as const))(
    '%s left out: the command and the option',
    async (_, c, o) => {
      const { argv } = valid(c);
      const i = argv.indexOf(o.long!);
      refused(await runCli([...argv.slice(0, i), ...argv.slice(i + 2)]), [
        `${c.name} ${o.long!}: is required`,
        `write ${o.long!}`,
      ]);
    },
  );
});

describe.each(DECLARED)('$name: the parser refuses in the program form', (c) => {
  test('an unknown option names the command and the option, and a near one when there is one', async () => {
    const { argv, out } = valid(c);
    refused(await runCli([...argv, '--no-such-option']), [
      `${c.name}: --no-such-option is not an option of ${c.name}`,
      `skytally ${c.name} --help`,
    ]);
    nothingWritten(out);
    refused(await runCli([...valid(c).argv, '--outt', 'x']), [
      `--outt is not an option of ${c.name}`,
      'write --out instead',
    ]);
    refused(await runCli([...valid(c).argv, '-q']), [`${c.name}: -q is not an option of ${c.name}`]);
  });
});

describe('arguments: the parser refuses in the program form', () => {
  const withArgument = DECLARED.filter((c) => c.args.some((a) => a.required));
  const fixedArguments = DECLARED.filter((c) => !c.args.some((a) => a.variadic));
  test('the commands of each kind (so that no test below is empty)', () => {
    expect(withArgument.map((c) => c.name)).toContain('predict');
    expect(fixedArguments.map((c) => c.name)).toContain('distances');
  });

  test.each(withArgument)('$name: a missing argument names the command and the argument', async (c) => {
    const first = c.args.find((a) => a.required)!;
    const mandatory = c.options.filter((o) => o.mandatory).flatMap((o) => [o.long!, '1']);
    refused(await runCli([c.name, ...mandatory]), [`${c.name}: needs a`, `skytally ${c.name} <${first.name}>`]);
  });

  test.each(fixedArguments)('$name: an extra argument is named and refused', async (c) => {
    const { argv, out } = valid(c);
    refused(await runCli([...argv, 'extra.yaml']), [`${c.name}: "extra.yaml" is more than ${c.name} takes`]);
    nothingWritten(out);
  });
});

describe('the program itself', () => {
  test('an unknown command names it and the near command, or lists the commands; so does help of an unknown command (failed before: help, exit 0)', async () => {
    refused(await runCli(['predikt', SURVEY]), [
      '"predikt" is not a command of skytally',
      'write skytally predict instead',
    ]);
    const names = COMMANDS.map((d) => d.name);
    const listed = refused(await runCli(['frobnicate']), ['"frobnicate" is not a command of skytally']);
    for (const n of names) expect(listed).toContain(n);
    const help = refused(await runCli(['help', 'frobnicate']), ['"frobnicate" is not a command of skytally']);
    for (const n of names) expect(help).toContain(n);
    // help of a near name: the near command's help, as the command itself is suggested (failed before: the list)
    refused(await runCli(['help', 'predikt']), [
      '"predikt" is not a command of skytally',
      'write skytally help predict instead',
    ]);
  });

  test('an empty file argument ("$FILE" unset) names the argument (failed before: "<working folder>: the file is a folder")', async () => {
    for (const c of DECLARED.filter((d) => d.args.length > 0)) {
      const { argv, out } = valid(c);
      // the first file argument given as ""
      const i = argv.findIndex((a, k) => k > 0 && !a.startsWith('--'));
      argv[i] = '';
      const arg = c.args[0]!;
      const line = refused(await runCli(argv), [
        `skytally: ${c.name}: ${arg.variadic ? `one of the <${arg.name}> arguments` : `the <${arg.name}> argument`} is empty`,
      ]);
      expect(line).not.toContain('folder');
      nothingWritten(out);
    }
    for (const command of ['distances', 'clustering']) {
      const r = await runCli([command, '--z', '1', '--survey', '']);
      refused(r, [`skytally: ${command} --survey: is empty; give the path of a survey file`]);
    }
  });

  test('skytally without a command asks for one and lists them, exit 2 (failed before: the help, exit 0)', async () => {
    const line = refused(await runCli([]), ['skytally: a command is needed', 'e.g. skytally predict FILE']);
    for (const n of COMMANDS.map((d) => d.name)) expect(line).toContain(n);
  });

  test('an unknown option before any command names it and asks for a command', async () => {
    refused(await runCli(['--no-such-option']), [
      '--no-such-option is not an option of skytally',
      'name a command first',
    ]);
  });

  test('help and version still succeed', async () => {
    for (const argv of [['--help'], ['help', 'predict'], ['predict', '--help'], ['--version']]) {
      const r = await runCli(argv);
      expect(r.code, argv.join(' ')).toBe(0);
      expect(r.stdout.length, argv.join(' ')).toBeGreaterThan(0);
    }
  });
});

describe('a refusal carries the parts of its sentence, from which the command line composes its own', () => {
  test('file, key and text: the message is "file: key: text" made printable (failed before: no text)', () => {
    // the sentence's form is the project's (src/errors.ts: "<file>: <key>: <what>; <fix>.")
    const e = inputError('out_of_range', 'a\tb.yaml', 'area', 'is 0', 'give an area above 0 deg^2');
    expect([e.file, e.keyPath, e.text]).toEqual(['a\tb.yaml', 'area', 'is 0; give an area above 0 deg^2.']);
    expect(e.message).toBe('a\\tb.yaml: area: is 0; give an area above 0 deg^2.');
    const option = inputError('bad_option', '', '--draws', 'is 0', 'give a whole number');
    expect([option.message, option.text]).toEqual([
      '--draws: is 0; give a whole number.',
      'is 0; give a whole number.',
    ]);
  });
  test('an option refused about a file names the command, the option, then the file, escaped once', async () => {
    // a copy of a sample under a name with a tab: the name is written \t in the sentence, once
    const file = join(dir, 'tab\there.yaml');
    copyFileSync(SURVEY, file);
    const r = await runCli(['forecast', file, '--population', 'nope']);
    const line = refused(r, ['forecast --population: ']);
    expect(line).toBe(
      `skytally: forecast --population: ${file.replace('\t', '\\t')}: there is no population named "nope"; use one of "H-alpha emitters".`,
    );
    rmSync(file);
    // a refusal of an option alone: the command, the option, the text
    const draws = refused(await runCli(['predict', SURVEY, '--draws', '2.5']), ['predict --draws: ']);
    expect(draws).toBe(
      'skytally: predict --draws: "2.5" is not a whole number from 1 to 100000; give --draws a whole number in that range.',
    );
  });
});
