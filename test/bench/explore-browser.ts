/**
 * The explore page's updates in a real browser (Debian's chromium through playwright-core, as
 * test/explore/browser.test.ts drives it): for every bundled sample, the page made by
 * `skytally explore`, opened from file://, and each control moved ROUNDS times (a number set and
 * `input` fired, as a dragged slider does), waiting for each update to finish. Per sample and
 * control: the median wall time of an update as the page measures it (document.body.dataset.updateMs:
 * predict, Fisher, redraw) and the median main-thread CPU of the change (the DevTools protocol's
 * TaskDuration between setting the value and the update done, which includes the layout of the
 * redrawn parts and the driver's own evaluations in the page, some 10-20 ms). Figures only.
 *   npx tsx test/bench/explore-browser.ts [filter] [--rounds N]
 */
import { existsSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { chromium } from 'playwright-core';
import setupTestRun from '../support/global-setup.js';
import { tempDir } from '../support/temp.js';
import { useExploreScript } from '../support/explore-script.js';
import { runCli } from '../cli/helpers.js';

declare const document: { body: { dataset: Record<string, string | undefined> } };
type Field = { value: string; dispatchEvent(e: Event): boolean };

const CHROMIUM = '/usr/bin/chromium';
const args = process.argv.slice(2);
const roundsAt = args.indexOf('--rounds');
const ROUNDS = roundsAt >= 0 ? Number(args[roundsAt + 1]) : 9;
const filter = args.find((a, i) => !a.startsWith('--') && args[i - 1] !== '--rounds') ?? '';

if (!existsSync(CHROMIUM)) {
  console.log(`${CHROMIUM} is absent: nothing measured`);
  process.exit(0);
}
const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[xs.length >> 1]!;

const teardown = await setupTestRun();
try {
  await useExploreScript();
  const dir = tempDir('skytally-explore-bench-');
  const context = await chromium.launchPersistentContext(join(dir, 'profile'), {
    executablePath: CHROMIUM,
    headless: true,
    args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-background-networking', '--no-first-run'],
  });
  const samples = readdirSync('samples').filter((f) => f.endsWith('.yaml') && f.includes(filter));
  for (const sample of samples) {
    const html = join(dir, sample.replace('.yaml', '.html'));
    const r = await runCli(['explore', `samples/${sample}`, '--out', html]);
    if (r.code !== 0) {
      console.log(`${sample}: the page was not made (${r.stderr.trim()})`);
      continue;
    }
    const page = await context.newPage();
    const cdp = await context.newCDPSession(page);
    await cdp.send('Performance.enable');
    const taskSeconds = async () =>
      (await cdp.send('Performance.getMetrics')).metrics.find((m) => m.name === 'TaskDuration')!.value;
    await page.goto(pathToFileURL(html).href, { waitUntil: 'load' });
    await page.waitForFunction(() => document.body.dataset.ready === 'true');
    const controls = await page.$$eval('input[data-key]', (els) =>
      els.map((e) => ({
        key: e.getAttribute('data-key')!,
        value: Number((e as unknown as Field).value),
        min: Number(e.getAttribute('min')),
        max: Number(e.getAttribute('max')),
      })),
    );
    for (const c of controls) {
      const wall: number[] = [];
      const cpu: number[] = [];
      for (let i = 0; i <= ROUNDS; i++) {
        // a new value within the control's range on every round (the first round warms up)
        const f = ((i % 7) - 3) / 60;
        const lo = Number.isFinite(c.min) ? c.min : -Infinity;
        const hi = Number.isFinite(c.max) && c.max > c.min ? c.max : Infinity;
        const v = Math.min(hi, Math.max(lo, c.value * (1 + f) || f));
        const before = Number(await page.evaluate(() => document.body.dataset.updates));
        const t0 = await taskSeconds();
        await page.$eval(
          `input[data-key="${c.key}"]`,
          (el, x) => {
            (el as unknown as Field).value = String(x);
            el.dispatchEvent(new Event('input', { bubbles: true }));
          },
          v,
        );
        await page.waitForFunction(
          (n) => Number(document.body.dataset.updates) > n && document.body.dataset.busy === 'false',
          before,
        );
        const t1 = await taskSeconds();
        if (i === 0) continue;
        wall.push(Number(await page.evaluate(() => document.body.dataset.updateMs)));
        cpu.push(1000 * (t1 - t0));
      }
      console.log(
        `${`${sample.replace('.yaml', '')}, ${c.key}`.padEnd(60)} update wall median ${median(wall).toFixed(1).padStart(7)} ms   main-thread CPU median ${median(cpu).toFixed(1).padStart(7)} ms   (n=${ROUNDS})`,
      );
    }
    await page.close();
  }
  await context.close();
} finally {
  teardown();
}
