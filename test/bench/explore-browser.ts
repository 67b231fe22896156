/**
 * The explore page's updates in a real browser (Debian's chromium through playwright-core, as
 * test/explore/browser.test.ts drives it): for every bundled sample, the page made by
 * `skytally explore`, opened from file://, and each control moved ROUNDS times (a number set and
 * `input` fired, as a dragged slider does), waiting for each update to finish. Per sample and
 * control, medians over the rounds of:
 *  - page: the update's time as the page measures it (document.body.dataset.updateMs: the engine
 *    (predict, Fisher), then the redraw with the layout it needs), and its parts: engine, draw;
 *    with model_uncertainty, then the model's draws and their redraw, after a paint (modelMs);
 *  - CPU: the main thread's busy time of the change (the DevTools protocol's TaskDuration between
 *    setting the value and the update done) less the median of the same driver calls that change
 *    nothing (the driver's own evaluations in the page, some 10-20 ms, measured per page).
 * With `--baseline FILE` (a page script bundled by scripts/explore-bundle.mjs from other sources)
 * every sample's page is made with both scripts and their rounds alternate, so that the two are
 * timed under the same load of the machine. Figures only.
 *   npx tsx test/bench/explore-browser.ts [filter] [--rounds N] [--baseline FILE]
 */
import { existsSync, readdirSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { pathToFileURL } from 'node:url';
import { chromium, type BrowserContext, type CDPSession, type Page } from 'playwright-core';
import setupTestRun from '../support/global-setup.js';
import { tempDir } from '../support/temp.js';
import { useExploreScript } from '../support/explore-script.js';
import { runCli } from '../cli/helpers.js';
import { EXPLORE_SCRIPT_VARIABLE } from '../../src/library/explore/page.js';

declare const document: { body: { dataset: Record<string, string | undefined> } };
type Field = { value: string; dispatchEvent(e: Event): boolean };

const CHROMIUM = '/usr/bin/chromium';
const args = process.argv.slice(2);
const option = (name: string): string | undefined => {
  const at = args.indexOf(name);
  return at >= 0 ? args[at + 1] : undefined;
};
const ROUNDS = Number(option('--rounds') ?? 9);
const BASELINE = option('--baseline');
const filter = args.find((a, i) => !a.startsWith('--') && !args[i - 1]?.startsWith('--')) ?? '';

if (!existsSync(CHROMIUM)) {
  console.log(`${CHROMIUM} is absent: nothing measured`);
  process.exit(0);
}
const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[xs.length >> 1]!;

interface Control {
  key: string;
  value: number;
  min: number;
  max: number;
}
interface Timings {
  page: number[];
  engine: number[];
  draw: number[];
  /** The model's draws and their redraw, after the update (absent without model_uncertainty). */
  model: number[];
  cpu: number[];
}

/** One page of a sample (made with one page script) and its DevTools session. */
class Opened {
  driver = 0;
  constructor(
    readonly page: Page,
    readonly cdp: CDPSession,
  ) {}

  static async open(context: BrowserContext, html: string): Promise<Opened> {
    const page = await context.newPage();
    const cdp = await context.newCDPSession(page);
    await cdp.send('Performance.enable');
    await page.goto(pathToFileURL(html).href, { waitUntil: 'load' });
    await page.waitForFunction(() => document.body.dataset.ready === 'true');
    const o = new Opened(page, cdp);
    const idle: number[] = [];
    for (let i = 0; i < 7; i++) idle.push(await o.round(undefined));
    o.driver = median(idle);
    return o;
  }

  async taskSeconds(): Promise<number> {
    return (await this.cdp.send('Performance.getMetrics')).metrics.find((m) => m.name === 'TaskDuration')!.value;
  }

  /** The main thread's busy ms of setting a control (or, without one, of the same calls changing nothing). */
  async round(set: { key: string; value: number } | undefined): Promise<number> {
    const { page } = this;
    const before = Number(await page.evaluate(() => document.body.dataset.updates));
    const t0 = await this.taskSeconds();
    await page.$eval(
      set ? `input[data-key="${set.key}"]` : 'body',
      (el, x) => {
        if (x === null) {
          el.dispatchEvent(new Event('idle-round'));
          return;
        }
        (el as unknown as Field).value = String(x);
        el.dispatchEvent(new Event('input', { bubbles: true }));
      },
      set ? set.value : null,
    );
    await page.waitForFunction(
      (n) => (n < 0 || Number(document.body.dataset.updates) > n) && document.body.dataset.busy === 'false',
      set ? before : -1,
    );
    return 1000 * ((await this.taskSeconds()) - t0);
  }

  async move(c: Control, v: number, t: Timings | undefined): Promise<void> {
    const cpu = await this.round({ key: c.key, value: v });
    if (!t) return;
    const d = await this.page.evaluate(() => [
      document.body.dataset.updateMs,
      document.body.dataset.computeMs,
      document.body.dataset.drawMs,
      document.body.dataset.modelMs,
    ]);
    t.page.push(Number(d[0]));
    t.engine.push(Number(d[1]));
    t.draw.push(Number(d[2]));
    if (d[3] !== undefined) t.model.push(Number(d[3]));
    t.cpu.push(cpu - this.driver);
  }
}

const fmt = (x: number) => (Number.isFinite(x) ? x.toFixed(1) : '-').padStart(6);
const least = (xs: number[]) => Math.min(...xs);
function line(label: string, t: Timings): string {
  const model =
    t.model.length > 0
      ? `; then model ${fmt(median(t.model))} (least ${fmt(least(t.model))}, ${t.model.length} drawn)`
      : '';
  return `${label.padEnd(62)} page ${fmt(median(t.page))} (engine ${fmt(median(t.engine))}, draw ${fmt(median(t.draw))}; least ${fmt(least(t.page))})${model}   CPU ${fmt(median(t.cpu))} (least ${fmt(least(t.cpu))}) ms`;
}

const teardown = await setupTestRun();
try {
  await useExploreScript();
  const scripts: [string, string][] = [['', process.env[EXPLORE_SCRIPT_VARIABLE]!]];
  if (BASELINE) scripts.push(['baseline', resolve(BASELINE)]);
  const dir = tempDir('skytally-explore-bench-');
  const context = await chromium.launchPersistentContext(join(dir, 'profile'), {
    executablePath: CHROMIUM,
    headless: true,
    args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-background-networking', '--no-first-run'],
  });
  console.log(
    `page: the update as the page times it (engine + draw with layout); CPU: main-thread busy time less the driver's own; medians of ${ROUNDS} rounds and the least (the machine's load only adds), ms`,
  );
  const samples = readdirSync('samples').filter((f) => f.endsWith('.yaml') && f.includes(filter));
  for (const sample of samples) {
    const opened: Opened[] = [];
    for (const [name, script] of scripts) {
      process.env[EXPLORE_SCRIPT_VARIABLE] = script;
      const html = join(dir, `${name}${sample.replace('.yaml', '.html')}`);
      const r = await runCli(['explore', `samples/${sample}`, '--out', html]);
      if (r.code !== 0) throw new Error(`${sample}: the page was not made (${r.stderr.trim()})`);
      opened.push(await Opened.open(context, html));
    }
    process.env[EXPLORE_SCRIPT_VARIABLE] = scripts[0]![1];
    const controls: Control[] = await opened[0]!.page.$$eval('input[data-key]', (els) =>
      els.map((e) => ({
        key: e.getAttribute('data-key')!,
        value: Number((e as unknown as Field).value),
        min: Number(e.getAttribute('min')),
        max: Number(e.getAttribute('max')),
      })),
    );
    for (const c of controls) {
      const timings = opened.map((): Timings => ({ page: [], engine: [], draw: [], model: [], cpu: [] }));
      for (let i = 0; i <= ROUNDS; i++) {
        // a new value on every round (nothing the page kept from an earlier round serves it),
        // within the control's range (the first round warms up)
        const f = (i + 1) / (ROUNDS + 2) - 0.5;
        const ranged = Number.isFinite(c.min) && Number.isFinite(c.max) && c.max > c.min;
        // (a range of decades, such as the area's or a flux limit's, in steps of its logarithm)
        const decades = ranged && c.min > 0 && c.max / c.min >= 100;
        const v = decades
          ? Math.min(c.max, Math.max(c.min, c.value * (c.max / c.min) ** (0.2 * f)))
          : ranged
            ? Math.min(c.max, Math.max(c.min, c.value + 0.2 * f * (c.max - c.min)))
            : c.value * (1 + f / 10) || f;
        for (let k = 0; k < opened.length; k++) await opened[k]!.move(c, v, i === 0 ? undefined : timings[k]);
      }
      const label = `${sample.replace('.yaml', '')}, ${c.key}`;
      console.log(line(label, timings[0]!));
      if (timings[1]) console.log(line('  (baseline)', timings[1]));
    }
    for (const o of opened) await o.page.close();
  }
  await context.close();
} finally {
  teardown();
}
