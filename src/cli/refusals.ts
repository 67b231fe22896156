/**
 * commander's own refusals (a choice not allowed, an option without its value, an unknown option
 * or command, a missing or extra argument) in the program's form: one sentence naming the command
 * and the option and saying what to write instead, thrown as bad input (exit 2, nothing written)
 * like every other refusal of the program. commander reports each through `error(message,
 * {code})`; `ProgramCommand` takes that call over for the program and every command.
 */
import { Command, type Option } from 'commander';
import { excerpt, inputError } from '../errors.js';

/** The program and its commands: commander's Command with the program's refusals. */
export class ProgramCommand extends Command {
  override createCommand(name?: string): Command {
    return new ProgramCommand(name);
  }

  override error(message: string, errorOptions?: { code?: string; exitCode?: number }): never {
    throw refusal(this, message, errorOptions?.code ?? '');
  }
}

/** "skytally predict" for a command, "skytally" for the program. */
function usageName(cmd: Command): string {
  return cmd.parent ? `skytally ${cmd.name()}` : 'skytally';
}

/** What a command is called in a message: "predict", or "skytally" for the program. */
function where(cmd: Command): string {
  return cmd.parent ? cmd.name() : 'skytally';
}

/** "a, b or c". */
function orList(items: readonly string[]): string {
  return items.length <= 1 ? (items[0] ?? '') : `${items.slice(0, -1).join(', ')} or ${items[items.length - 1]}`;
}

/** The first words of a help text, before any detail in brackets or after a semicolon or colon. */
function gist(description: string): string {
  return description.split(/[(;:]/)[0]!.trim();
}

function optionByFlags(cmd: Command, flags: string): Option | undefined {
  for (let c: Command | null = cmd; c; c = c.parent) {
    const found = c.options.find((o) => o.flags === flags);
    if (found) return found;
  }
  return undefined;
}

/** How to write an option with a value: "--format table, --format json or --format csv", or "--out <file> (what it is)". */
function howToWrite(option: Option): string {
  const name = option.long ?? option.short ?? option.flags;
  if (option.argChoices && option.argChoices.length > 0) return orList(option.argChoices.map((c) => `${name} ${c}`));
  const what = gist(option.description);
  return `${option.flags}${what ? ` (${what})` : ''}`;
}

const SEE_HELP = (cmd: Command) => `${usageName(cmd)} --help lists ${cmd.parent ? 'its options' : 'the commands'}`;

/** The refusal for one of commander's errors, with the command it arose in. */
function refusal(cmd: Command, message: string, code: string) {
  const text = message.replace(/^error: /, '').trim();
  const at = where(cmd);
  switch (code) {
    case 'commander.invalidArgument': {
      // "option '--format <format>' argument 'csv' is invalid. Allowed choices are html, json."
      const m = /^option '(.+?)' argument '([\s\S]*)' is invalid\./.exec(text);
      const option = m ? optionByFlags(cmd, m[1]!) : undefined;
      if (m && option) {
        const name = option.long ?? option.flags;
        return inputError(
          'bad_option',
          '',
          `${at} ${name}`,
          `"${excerpt(m[2]!)}" is not ${option.argChoices ? 'one of its choices' : 'a value it takes'}`,
          `write ${howToWrite(option)}`,
        );
      }
      break;
    }
    case 'commander.optionMissingArgument':
    case 'commander.missingMandatoryOptionValue': {
      // "option '--out <file>' argument missing", "required option '--z <list>' not specified"
      const m = /option '(.+?)'/.exec(text);
      const option = m ? optionByFlags(cmd, m[1]!) : undefined;
      if (option) {
        const name = option.long ?? option.flags;
        const what = code === 'commander.optionMissingArgument' ? 'needs a value after it' : 'is required';
        return inputError('bad_option', '', `${at} ${name}`, what, `write ${howToWrite(option)}`);
      }
      break;
    }
    case 'commander.unknownOption': {
      // "unknown option '--colour'", with "\n(Did you mean --color?)"
      const m = /^unknown option '([\s\S]*?)'(?:\s*\(Did you mean (.+)\?\))?$/.exec(text);
      if (m) {
        const flag = excerpt(m[1]!);
        const fix = m[2]
          ? `write ${m[2]} instead (${SEE_HELP(cmd)})`
          : cmd.parent
            ? `leave it out or write one of its options (${SEE_HELP(cmd)})`
            : `name a command first, e.g. skytally predict FILE (${SEE_HELP(cmd)})`;
        return inputError('bad_option', '', cmd.parent ? at : '', `${flag} is not an option of ${at}`, fix);
      }
      break;
    }
    case 'commander.unknownCommand': {
      const name = excerpt(cmd.args[0] ?? '');
      return unknownCommand(cmd, name, /\(Did you mean (.+)\?\)/.exec(text)?.[1]);
    }
    case 'commander.missingArgument': {
      // "missing required argument 'survey'"
      const m = /argument '(.+?)'/.exec(text);
      const arg = cmd.registeredArguments.find((a) => a.name() === m?.[1]);
      if (arg) {
        const what = gist(arg.description) || arg.name();
        return inputError(
          'bad_option',
          '',
          at,
          `needs ${/^[aeiou]/i.test(what) ? 'an' : 'a'} ${what}`,
          `write ${usageName(cmd)} <${arg.name()}> [options]`,
        );
      }
      break;
    }
    case 'commander.excessArguments': {
      const expected = cmd.registeredArguments;
      const extra = cmd.args.slice(expected.length).map((a) => `"${excerpt(a)}"`);
      const takes =
        expected.length === 0
          ? 'no arguments, only options'
          : `${expected.length === 1 ? 'one argument' : `${expected.length} arguments`}, ${orList(expected.map((a) => `<${a.name()}>`))}`;
      return inputError(
        'bad_option',
        '',
        at,
        `${extra.join(', ')} ${extra.length === 1 ? 'is' : 'are'} more than ${at} takes (${takes})`,
        expected.length === 0
          ? `leave ${extra.length === 1 ? 'it' : 'them'} out (${SEE_HELP(cmd)})`
          : `write ${usageName(cmd)} ${expected.map((a) => `<${a.name()}>`).join(' ')} [options] (an option's value follows its option)`,
      );
    }
  }
  // any other refusal of commander's: its words, in one sentence of the program's form
  return inputError(
    'bad_option',
    '',
    at,
    excerpt(text.replace(/\s*\n\s*/g, ' ').replace(/\.$/, ''), 300),
    SEE_HELP(cmd),
  );
}

/** "predikt" is not a command: the one commander suggests, or the list of commands. */
export function unknownCommand(program: Command, name: string, suggestion?: string) {
  const commands = program.commands.map((c) => c.name());
  const fix = suggestion
    ? `write skytally ${suggestion} instead (skytally --help lists the commands)`
    : `use one of ${orList(commands)} (skytally --help describes them)`;
  return inputError('bad_option', '', '', `"${name}" is not a command of skytally`, fix);
}

/** "skytally" alone: one sentence asking for a command and listing them (commander printed the help and succeeded). */
export function missingCommand(program: Command) {
  const commands = program.commands.map((c) => c.name());
  return inputError(
    'bad_option',
    '',
    '',
    'a command is needed',
    `use one of ${orList(commands)}, e.g. skytally predict FILE (skytally --help describes them)`,
  );
}
