/**
 * The command-line program: `run(argv, io)` returns an exit code (0 success, 1 internal failure,
 * 2 bad input). Each command lives in src/cli/commands/<name>.ts and loads its heavy modules only
 * when it runs, so that start-up pays only for the command used.
 */
import { CommanderError, type Command } from 'commander';
import { excerpt, inputError, printable, SurveyError } from '../errors.js';
import { removePendingFiles, type CliIO } from './io.js';
import { COMMANDS } from './commands/index.js';
import { missingCommand, ProgramCommand, unknownCommand } from './refusals.js';
import packageJson from '../../package.json' with { type: 'json' };

/** The package's version, from package.json (the bundle carries the value, not the file). */
export const VERSION: string = packageJson.version;

export async function run(argv: readonly string[], io: CliIO): Promise<number> {
  // commander's own refusals (bad choice, missing value, unknown option or command, missing or
  // extra argument) are thrown as bad input in the program's form (src/cli/refusals.ts)
  const program = new ProgramCommand();
  program
    .name('skytally')
    .description('Expected galaxy counts, their uncertainties and forecasts for a planned survey.')
    .version(VERSION)
    .exitOverride()
    .configureOutput({
      writeOut: (s) => io.stdout(s),
      writeErr: (s) => io.stderr(lines(s)),
    })
    .showHelpAfterError(false);
  let exitCode = 0;
  // A run names one command: only that one is declared (its options cost time at every start);
  // without a command name first (help, --version, a mistyped name) every command is, for the
  // listing and commander's suggestions.
  const named = COMMANDS.filter((def) => def.name === argv[0]);
  for (const def of named.length === 1 ? named : COMMANDS) {
    const cmd = program.command(def.name).description(def.description).exitOverride();
    def.configure(cmd);
    refuseRepeatedOptions(cmd);
    cmd.action(async (...args: unknown[]) => {
      try {
        refuseEmptyArguments(cmd, args);
        exitCode = await def.action(cmd, args, io);
      } catch (err) {
        throw withCommand(def.name, err);
      }
    });
  }
  try {
    if (argv.length === 0) throw missingCommand(program);
    // "skytally help predikt": commander would print the program's help and succeed; refused
    // as "skytally predikt" is, with the near command's help ("skytally help predict") when there is one
    const helpOf = argv[0] === 'help' ? argv[1] : undefined;
    if (helpOf !== undefined && !COMMANDS.some((def) => def.name === helpOf)) {
      const near = await nearCommand(helpOf);
      throw unknownCommand(program, excerpt(helpOf), near === undefined ? undefined : `help ${near}`);
    }
    await program.parseAsync(['node', 'skytally', ...argv]);
    return exitCode;
  } catch (err) {
    return handleError(err, io);
  }
}

/** The command nearest `name` by edit distance, when near enough to be a likely typo (as commander suggests one). */
async function nearCommand(name: string): Promise<string | undefined> {
  const { closest, distance } = await import('fastest-levenshtein');
  const names = COMMANDS.map((def) => def.name);
  const best = closest(name.toLowerCase(), names);
  return distance(name.toLowerCase(), best) <= Math.max(2, Math.floor(best.length / 3)) ? best : undefined;
}

/**
 * A file argument given as "" (an unset shell variable: skytally predict "$FILE") is refused
 * naming the argument, where it resolved to the working folder ("the file is a folder").
 */
function refuseEmptyArguments(cmd: Command, args: readonly unknown[]): void {
  cmd.registeredArguments.forEach((arg, i) => {
    const v = args[i];
    const values = Array.isArray(v) ? (v as unknown[]) : [v];
    if (!values.some((x) => x === '')) return;
    throw inputError(
      'bad_option',
      '',
      cmd.name(),
      `${arg.variadic ? `one of the <${arg.name()}> arguments` : `the <${arg.name()}> argument`} is empty`,
      `write skytally ${cmd.name()} ${arg.variadic ? `<${arg.name()}...>` : `<${arg.name()}>`} [options] with the path of a file`,
    );
  });
}

/**
 * An option that takes a value, given twice ("--target alpha=0.05 --target m_star=0.1"), is
 * refused: commander keeps the last value and drops the first without a word.
 */
function refuseRepeatedOptions(cmd: Command): void {
  const seen = new Set<string>();
  for (const opt of cmd.options) {
    if (!opt.required && !opt.optional) continue; // a flag given twice says the same
    const flag = opt.long ?? opt.flags;
    cmd.on(`option:${opt.name()}`, () => {
      if (seen.has(flag)) {
        const list =
          flag === '--target' ? ' (several targets as one list: --target alpha=0.05,log10_phi_star=0.1)' : '';
        throw inputError('bad_option', '', `${cmd.name()} ${flag}`, 'is given twice', `give it once${list}`);
      }
      seen.add(flag);
    });
  }
}

/**
 * A refusal of one of the command's options ("--draws: ...", thrown by the command's own checks
 * or the library's checks of flags) in the form of commander's refusals (src/cli/refusals.ts):
 * "predict --draws: ...", naming the command; one about what a file holds ("FILE: --population:
 * there is no population named ...") names the file after the option ("compare --population:
 * FILE: ..."). Composed from the refusal's parts (file, key, text). Other errors pass as they are.
 */
function withCommand(command: string, err: unknown): unknown {
  if (!(err instanceof SurveyError) || !err.keyPath.startsWith('--')) return err;
  const keyPath = `${command} ${err.keyPath}`;
  const file = err.file === '' ? '' : `${err.file}: `;
  return new SurveyError(err.code, err.file, keyPath, err.text, printable(`${keyPath}: ${file}${err.text}`));
}

export function handleError(err: unknown, io: CliIO): number {
  if (err instanceof SurveyError) {
    io.stderr(`skytally: ${err.message}\n`);
    return 2;
  }
  if (err instanceof CommanderError) {
    if (err.code === 'commander.helpDisplayed' || err.code === 'commander.version' || err.code === 'commander.help')
      return 0;
    // commander's refusals are thrown as SurveyError (src/cli/refusals.ts): here only help and version
    return err.exitCode === 0 ? 0 : 2;
  }
  const msg = err instanceof Error ? err.message : String(err);
  io.stderr(`skytally: internal failure: ${printable(msg)}\n`);
  if (process.env.SKYTALLY_DEBUG && err instanceof Error) io.stderr(`${err.stack}\n`);
  return 1;
}

/** Text whose lines are each made safe for a terminal (printable), the line breaks kept. */
function lines(s: string): string {
  return s.split('\n').map(printable).join('\n');
}

/**
 * A reader that stops early (`skytally ... | head -1`) closes the pipe: the program then ends at
 * once, quietly and with status 0, as command-line tools do, leaving no temporary file behind.
 */
function endQuietlyOnClosedPipe(): void {
  process.stdout.on('error', (e: NodeJS.ErrnoException) => {
    if (e.code !== 'EPIPE') throw e;
    removePendingFiles();
    process.exit(0);
  });
  process.stderr.on('error', (e: NodeJS.ErrnoException) => {
    if (e.code !== 'EPIPE') throw e;
  });
}

/** Entry point for bin/skytally.js. */
export async function main(): Promise<void> {
  endQuietlyOnClosedPipe();
  const io: CliIO = {
    stdout: (s) => process.stdout.write(s),
    stderr: (s) => process.stderr.write(s),
    cwd: process.cwd(),
    stderrIsTTY: Boolean(process.stderr.isTTY),
    stdoutIsTTY: Boolean(process.stdout.isTTY),
  };
  const code = await run(process.argv.slice(2), io);
  process.exitCode = code;
}
