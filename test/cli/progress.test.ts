/**
 * The progress bar's time notes (src/cli/progress.ts), with a clock the test sets. What is checked is
 * arithmetic of the project's own choosing: the time left is the time spent per part done times the
 * parts left (common practice for work whose parts cost about the same), shown from half a second on.
 */
import { describe, expect, test } from 'vitest';
import { formatDuration, mockProgressBar, stageBar, timeNote } from '../../src/cli/progress.js';

function terminal() {
  const io = { err: '', stdout: () => true, stderr: (t: string) => ((io.err += t), true), cwd: '.', stderrIsTTY: true };
  return io;
}

describe('progress bar with time', () => {
  test('durations read in seconds, minutes and hours', () => {
    expect(formatDuration(400)).toBe('0.4 s');
    expect(formatDuration(9_940)).toBe('9.9 s');
    expect(formatDuration(12_400)).toBe('12 s');
    expect(formatDuration(185_000)).toBe('3 min 05 s');
    expect(formatDuration(7_620_000)).toBe('2 h 07 min');
  });

  test('time left: spent per part done times the parts left, only after half a second', () => {
    expect(timeNote(300, 1, 10)).toBe('');
    expect(timeNote(2_000, 0, 10)).toBe('');
    expect(timeNote(2_000, 1, 10)).toBe('about 18 s left');
    expect(timeNote(60_000, 50, 100)).toBe('about 1 min 00 s left');
    expect(timeNote(61_000, 100, 100)).toBe('in 1 min 01 s');
  });

  test('the mock bar draws the estimate, then the time taken, and ends its line', () => {
    let t = 0;
    const io = terminal();
    const bar = mockProgressBar(io, () => t);
    bar(0, 4);
    t = 1_000;
    bar(1, 4);
    t = 4_000;
    bar(4, 4);
    const lines = io.err.split('\r').filter(Boolean);
    expect(lines[1]).toBe(`mock surveys   [${'#'.repeat(8)}${'.'.repeat(22)}] 1/4  about 3.0 s left`);
    expect(lines[2]!.startsWith(`mock surveys   [${'#'.repeat(30)}] 4/4  in 4.0 s`)).toBe(true);
    expect(io.err.endsWith('\n')).toBe(true);
  });

  test('a shorter line is padded over the longer one; a new stage starts its own clock', () => {
    let t = 0;
    const io = terminal();
    const bar = stageBar(io, () => t);
    bar('depth table', 0, 2);
    t = 120_000;
    bar('depth table', 1, 2); // "about 2 min 00 s left"
    t = 121_000;
    bar('depth table', 1, 2); // "about 2 min 01 s left"
    t = 125_000;
    bar('depth table', 2, 2); // "in 2 min 05 s"
    bar('ranking', 1, 3); // new clock: no estimate yet
    const lines = io.err.split('\r').filter(Boolean);
    expect(lines[1]!.endsWith('about 2 min 00 s left')).toBe(true);
    expect(lines[3]).toMatch(/ 2\/2 {2}in 2 min 05 s {8}\n$/);
    expect(lines[4]).toBe(`ranking        [${'#'.repeat(10)}${'.'.repeat(20)}] 1/3`);
  });

  test('an unchanged line is not drawn again', () => {
    let t = 0;
    const io = terminal();
    const bar = stageBar(io, () => t);
    bar('x', 1, 1000);
    t = 100;
    bar('x', 1, 1000); // the same parts, no estimate yet: the same line
    t = 1_000;
    bar('x', 1, 1000); // now with an estimate
    expect(io.err.split('\r').filter(Boolean).length).toBe(2);
  });
});
