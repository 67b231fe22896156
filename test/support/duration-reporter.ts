/**
 * A vitest reporter that writes each test file's time (importing it plus its tests and hooks, in
 * seconds) to test-output/file-durations.json at the end of a run. `node
 * scripts/record-test-durations.mjs` copies a full run's figures into test/support/durations.json,
 * which test/support/sequencer.ts reads to start the longest files first. (vitest's JSON summary
 * times a file from its first test, without the set-up hooks where the costly shared work is done.)
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { relative } from 'node:path';
import type { Reporter, TestModule } from 'vitest/node';

export class FileDurationReporter implements Reporter {
  private readonly seconds: Record<string, number> = {};

  onTestModuleEnd(module: TestModule): void {
    const d = module.diagnostic();
    const name = relative(process.cwd(), module.moduleId).split('\\').join('/');
    this.seconds[name] = Math.round((d.collectDuration + d.duration) / 100) / 10;
  }

  onTestRunEnd(): void {
    mkdirSync('test-output', { recursive: true });
    writeFileSync('test-output/file-durations.json', `${JSON.stringify(this.seconds, null, 2)}\n`);
  }
}
