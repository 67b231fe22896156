// `npm test`: the type check (`tsc --noEmit`) and every test (`vitest run`, which takes the
// arguments given after `npm test --`) run at the same time, so that the type check does not hold
// up the tests on a machine with few cores; the command fails when either fails. The type check
// uses TypeScript 7 (the native compiler, installed as `typescript7`: about 3 s of CPU for the
// whole project where 5.9 takes 15-18 s, time the tests need on two cores); the build's
// declarations, typescript-eslint and `npm run typecheck` use 5.9. It keeps its incremental state
// in node_modules/.cache/ and rechecks only what changed since.
import { spawn } from 'node:child_process';

/** Runs `node <script> <args>` with the terminal's output; resolves to its exit status. */
function run(script, args) {
  return new Promise((resolve) => {
    const child = spawn(process.execPath, [script, ...args], { stdio: 'inherit' });
    child.on('error', (e) => {
      console.error(`${script}: ${e.message}`);
      resolve(1);
    });
    child.on('close', (code) => resolve(code ?? 1));
  });
}

const typecheck = [
  '-p',
  'tsconfig.json',
  '--noEmit',
  '--incremental',
  '--tsBuildInfoFile',
  'node_modules/.cache/skytally/typecheck7.tsbuildinfo',
];
const [tsc, vitest] = await Promise.all([
  run('node_modules/typescript7/bin/tsc', typecheck),
  run('node_modules/vitest/vitest.mjs', ['run', ...process.argv.slice(2)]),
]);
if (tsc !== 0) console.error(`npm test: the type check failed (exit ${tsc})`);
process.exit(tsc !== 0 ? tsc : vitest);
