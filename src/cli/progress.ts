/**
 * The progress bar of long work (mock surveys, a plan's tables) on standard error, drawn only on a
 * terminal: one line per stage, redrawn in place, with the time spent and, once a part is done and
 * half a second has passed, an estimate of the time left (the time spent so far per part done, times
 * the parts left: the parts of one stage cost about the same). The stage's line ends with the time it
 * took.
 */
import type { CliIO } from './io.js';

/** Width of the bar in characters. */
const WIDTH = 30;
/** No estimate before this much time has passed (ms): the first parts include the start-up. */
const ESTIMATE_AFTER_MS = 500;

/** A duration for people: "0.4 s", "12 s", "3 min 05 s", "2 h 07 min". */
export function formatDuration(ms: number): string {
  const s = Math.max(0, ms) / 1000;
  if (s < 10) return `${s.toFixed(1)} s`;
  const whole = Math.round(s);
  if (whole < 60) return `${whole} s`;
  const min = Math.floor(whole / 60);
  if (min < 60) return `${min} min ${String(whole % 60).padStart(2, '0')} s`;
  return `${Math.floor(min / 60)} h ${String(min % 60).padStart(2, '0')} min`;
}

/** What follows the bar: the time left while the work runs, the time taken when it is done. */
export function timeNote(elapsedMs: number, done: number, total: number): string {
  if (done >= total) return `in ${formatDuration(elapsedMs)}`;
  if (done <= 0 || elapsedMs < ESTIMATE_AFTER_MS) return '';
  return `about ${formatDuration((elapsedMs * (total - done)) / done)} left`;
}

/**
 * A bar whose calls give the stage, the parts done and the parts in all. A new stage starts its own
 * clock and line. The line is redrawn only when what it shows changes; a shorter line than the one
 * before is padded so that nothing of the old one is left.
 */
export function stageBar(
  io: CliIO,
  now: () => number = () => performance.now(),
): (stage: string, done: number, total: number) => void {
  let stage: string | undefined;
  let start = 0;
  let last = '';
  return (name, done, total) => {
    if (name !== stage) {
      stage = name;
      start = now();
      last = '';
    }
    const filled = Math.max(0, Math.min(WIDTH, Math.round((WIDTH * done) / total)));
    const note = timeNote(now() - start, done, total);
    const line = `${name.padEnd(14)} [${'#'.repeat(filled)}${'.'.repeat(WIDTH - filled)}] ${done}/${total}${note ? `  ${note}` : ''}`;
    if (line === last) return;
    const pad = last.length > line.length ? ' '.repeat(last.length - line.length) : '';
    last = line;
    io.stderr(`\r${line}${pad}${done >= total ? '\n' : ''}`);
  };
}

/** The mock surveys' bar (forecast --mocks, and a report's forecast with mocks). */
export function mockProgressBar(io: CliIO, now?: () => number): (done: number, total: number) => void {
  const bar = stageBar(io, now);
  return (done, total) => bar('mock surveys', done, total);
}
