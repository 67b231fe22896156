import { run, type CliIO } from '../../src/cli/index.js';

export interface Captured {
  code: number;
  stdout: string;
  stderr: string;
}

/** Run the program in-process with captured output (the CLI is a function of its arguments and an IO object). */
export async function runCli(argv: string[], cwd = process.cwd()): Promise<Captured> {
  let stdout = '';
  let stderr = '';
  const io: CliIO = { stdout: (s) => (stdout += s), stderr: (s) => (stderr += s), cwd, stderrIsTTY: false };
  const code = await run(argv, io);
  return { code, stdout, stderr };
}
