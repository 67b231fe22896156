import type { Command } from 'commander';
import type { CliIO } from '../io.js';

/** One command: its options are declared in `configure`; `action` runs it and returns an exit code. */
export interface CommandDef {
  name: string;
  description: string;
  configure(cmd: Command): void;
  action(cmd: Command, args: unknown[], io: CliIO): Promise<number>;
}
