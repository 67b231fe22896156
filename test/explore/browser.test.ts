/**
 * The explore page in a real headless browser (Debian's chromium driven by playwright-core, as
 * test/render/browser.test.ts drives the report): opened from file://, it starts on the file's
 * numbers; moving the area and the limit (a number set and `input` fired) updates every output,
 * and every `data-output` then equals `skytally predict` / `skytally forecast` on the survey file
 * the page writes, to 1e-9 relative (expected values: the commands' own JSON, whose numbers are
 * checked against references in test/counts and test/forecast). No console error, no request
 * beyond the document, every control labelled and operable from the keyboard. Skipped, with a
 * message, only when /usr/bin/chromium is absent (.ci/chromium.sh installs it on CI).
 */
import { cpSync, existsSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { chromium, type BrowserContext, type Page } from 'playwright-core';
import { tempDir } from '../support/temp.js';
import { useExploreScript } from '../support/explore-script.js';
import { sampleExplorePage } from '../support/sample-explore.js';
import { expectedOutputs, expectSameOutputs } from './expected.js';

// The page's globals, as the functions run inside the page see them (the project compiles without the DOM library).
declare const document: {
  body: { dataset: Record<string, string | undefined> };
  querySelector(selector: string): { textContent: string | null; getAttribute(name: string): string | null } | null;
};
declare function requestAnimationFrame(callback: () => void): number;
type Field = { value: string; labels?: { length: number } | null; dispatchEvent(e: Event): boolean };

const CHROMIUM = '/usr/bin/chromium';
const haveChromium = existsSync(CHROMIUM);
if (!haveChromium)
  console.warn(`explore browser test skipped: ${CHROMIUM} is absent (CI installs it with .ci/chromium.sh)`);

/** Samples driven in the browser: a line survey with completeness and cosmic variance, a magnitude survey, a tabulated filter with interlopers (observed breakdown). */
const SAMPLES = ['halpha-narrowband.yaml', 'deep-continuum.yaml', 'narrowband-interlopers.yaml'];

async function outputsOf(page: Page): Promise<Map<string, number>> {
  const pairs = await page.$$eval('[data-output]', (els) =>
    els.map((e) => [e.getAttribute('data-output')!, Number(e.getAttribute('data-value'))] as [string, number]),
  );
  const m = new Map<string, number>();
  for (const [k, v] of pairs) {
    expect(m.has(k), `data-output ${k} appears once`).toBe(false);
    m.set(k, v);
  }
  return m;
}

/**
 * Every slider's aria-valuetext against its field's value: what a screen reader says of the slider
 * is the value the field holds, to 4 significant digits, then its unit (a log-scale slider's own
 * position is log10 of the value: before, an area of 0.1667 deg^2 was read out as "-0.778").
 */
async function expectSliderTexts(page: Page, what: string): Promise<void> {
  const rows = await page.$$eval('input[data-slider-for]', (els) =>
    els.map((e) => {
      const key = e.getAttribute('data-slider-for')!;
      const field = document.querySelector(`input[data-key="${key}"]`) as unknown as Field;
      return { key, text: e.getAttribute('aria-valuetext'), value: Number(field.value) };
    }),
  );
  expect(rows.length, what).toBeGreaterThan(0);
  for (const { key, text, value } of rows) {
    expect(text, `${what}: ${key}`).toBeTruthy();
    const said = Number(text!.split(' ')[0]);
    expect(Math.abs(said - value), `${what}: ${key} says "${text}", the field holds ${value}`).toBeLessThanOrEqual(
      5e-4 * Math.abs(value),
    );
  }
}

async function updates(page: Page): Promise<number> {
  return Number(await page.evaluate(() => document.body.dataset.updates));
}

/**
 * The survey file as the page writes it back (as page.textContent('#survey-yaml') reads it), the
 * number of updates and the last update's time, in one call: each call is a round trip to the
 * browser, and the keyboard test below makes a few hundred.
 */
async function pageState(page: Page): Promise<{ text: string | null; updates: number; updateMs: number }> {
  return page.evaluate(() => ({
    text: document.querySelector('#survey-yaml')?.textContent ?? null,
    updates: Number(document.body.dataset.updates),
    updateMs: Number(document.body.dataset.updateMs),
  }));
}

/**
 * Waits, inside the page, for an update after the `before`-th to finish, then returns pageState:
 * one round trip where waitForFunction and pageState take two (the keyboard test makes a few
 * hundred). Polls once a frame, as waitForFunction does by default.
 */
async function stateAfter(
  page: Page,
  before: number,
): Promise<{ text: string | null; updates: number; updateMs: number }> {
  return page.evaluate(
    (n) =>
      new Promise<{ text: string | null; updates: number; updateMs: number }>((resolve) => {
        const check = () => {
          if (Number(document.body.dataset.updates) > n && document.body.dataset.busy === 'false')
            resolve({
              text: document.querySelector('#survey-yaml')?.textContent ?? null,
              updates: Number(document.body.dataset.updates),
              updateMs: Number(document.body.dataset.updateMs),
            });
          else requestAnimationFrame(check);
        };
        check();
      }),
    before,
  );
}

async function settled(page: Page, before: number): Promise<void> {
  await page.waitForFunction(
    (n) => Number(document.body.dataset.updates) > n && document.body.dataset.busy === 'false',
    before,
  );
}

/** Set a control's number and fire `input`, as the contract says a script may. */
async function setControl(page: Page, key: string, value: number): Promise<void> {
  const before = await updates(page);
  await page.$eval(
    `input[data-key="${key}"]`,
    (el, v) => {
      (el as unknown as Field).value = String(v);
      el.dispatchEvent(new Event('input', { bubbles: true }));
    },
    value,
  );
  await settled(page, before);
}

describe.skipIf(!haveChromium)('explore page in headless chromium', () => {
  let context: BrowserContext;
  const dir = tempDir('skytally-explore-browser-');
  /** Update times in the page (document.body.dataset.updateMs): the first changes of a fresh page, and later ones. */
  const updateTimes: number[] = [];
  const warmTimes: number[] = [];

  beforeAll(async () => {
    await useExploreScript();
    cpSync('samples/filters', join(dir, 'filters'), { recursive: true });
    context = await chromium.launchPersistentContext(join(dir, 'profile'), {
      executablePath: CHROMIUM,
      headless: true,
      acceptDownloads: true,
      args: [
        '--headless',
        '--no-sandbox',
        '--disable-gpu',
        '--disable-background-networking',
        '--disable-component-update',
        '--no-first-run',
        '--disable-sync',
        '--disable-quic',
      ],
      viewport: { width: 1280, height: 900 },
    });
  });

  afterAll(async () => {
    await context?.close();
    rmSync(join(dir, 'profile'), { recursive: true, force: true });
    for (const [what, t] of [
      ['first changes of a fresh page', updateTimes],
      ['later changes (keyboard)', warmTimes],
    ] as const) {
      if (t.length === 0) continue;
      t.sort((a, b) => a - b);
      console.log(
        `explore page updates in chromium, ${what}: median ${t[t.length >> 1]!.toFixed(1)} ms, min ${t[0]!.toFixed(1)} ms over ${t.length} (figures only; not asserted)`,
      );
    }
  });

  describe.each(SAMPLES)('%s', (sample) => {
    let page: Page;
    const requests: string[] = [];
    const errors: string[] = [];
    let docUrl = '';

    beforeAll(async () => {
      // `explore samples/<sample> --out FILE`, run once and shared with test/explore/page.test.ts
      const r = await sampleExplorePage(sample);
      expect(r.code, r.stderr).toBe(0);
      docUrl = pathToFileURL(r.out).href;
      page = await context.newPage();
      page.on('request', (q) => {
        const u = q.url();
        if (u !== docUrl && !u.startsWith('data:') && !u.startsWith('blob:')) requests.push(u);
      });
      page.on('console', (m) => {
        if (m.type() === 'error' || m.type() === 'warning') errors.push(m.text());
      });
      page.on('pageerror', (e) => errors.push(String(e)));
      await page.goto(docUrl, { waitUntil: 'load' });
      await page.waitForFunction(() => document.body.dataset.ready === 'true');
      // the panel with the survey file as written: open, it follows every change
      await page.click('#survey-panel summary');
    });

    afterAll(async () => {
      await page?.close();
    });

    /** The page's text as written back, saved beside a copy of the samples' filters; the commands' numbers on it. */
    async function writtenBack(name: string): Promise<Map<string, number>> {
      const text = (await page.textContent('#survey-yaml'))!;
      const file = join(dir, name);
      writeFileSync(file, text);
      return expectedOutputs(file);
    }

    test('opens on the file: every data-output equals predict and forecast on the file itself', async () => {
      expectSameOutputs(await outputsOf(page), await expectedOutputs(`samples/${sample}`), 'first state');
      expect(await page.textContent('#survey-yaml')).toBe(readFileSync(`samples/${sample}`, 'utf8'));
    });

    test('area and limit moved: every data-output equals the commands on the written-back file to 1e-9', async () => {
      const area = Number(await page.$eval('input[data-key="area"]', (e) => (e as unknown as Field).value));
      const limit = Number(await page.$eval('input[data-key="detection.limit"]', (e) => (e as unknown as Field).value));
      const count0 = (await outputsOf(page)).get('total-count')!;
      await setControl(page, 'area', area * 0.5);
      updateTimes.push(Number(await page.evaluate(() => document.body.dataset.updateMs)));
      const count1 = (await outputsOf(page)).get('total-count')!;
      // counts are linear in the area (common practice: N = area x integral); 1e-12 relative
      expect(Math.abs(count1 - 0.5 * count0)).toBeLessThanOrEqual(1e-12 * count0);
      const deeper = sample === 'deep-continuum.yaml' ? limit + 0.5 : limit * 0.7;
      await setControl(page, 'detection.limit', deeper);
      updateTimes.push(Number(await page.evaluate(() => document.body.dataset.updateMs)));
      const shown = await outputsOf(page);
      expect(shown.get('total-count')!).toBeGreaterThan(count1);
      const text = (await page.textContent('#survey-yaml'))!;
      expect(text).toContain(`area: ${area * 0.5}`);
      expectSameOutputs(shown, await writtenBack(`moved-${sample}`), 'area and limit moved');
    });

    test('the button writes the same survey file the numbers are of', async () => {
      const [download] = await Promise.all([page.waitForEvent('download'), page.click('#write-survey')]);
      const saved = readFileSync(await download.path(), 'utf8');
      expect(saved).toBe(await page.textContent('#survey-yaml'));
      expect(await page.textContent('#status')).toContain('written');
    });

    test('every control is labelled and moves the page from the keyboard (arrow keys in the field and on its slider)', async () => {
      const keys = await page.$$eval('input[data-key]', (els) => els.map((e) => e.getAttribute('data-key')!));
      expect(keys).toContain('area');
      expect(keys).toContain('detection.limit');
      // every model parameter written as a number is a control (deep-continuum writes its model as expressions in z)
      if (sample !== 'deep-continuum.yaml') expect(keys.some((k) => k.endsWith('.alpha'))).toBe(true);
      // every field's labels and every slider's aria-label, read in one round trip
      const named = await page.evaluate(
        (ks: string[]) =>
          ks.map((key: string) => ({
            labels:
              (document.querySelector(`input[data-key="${key}"]`) as unknown as Field | null)?.labels?.length ?? 0,
            aria: document.querySelector(`input[data-slider-for="${key}"]`)?.getAttribute('aria-label') ?? null,
          })),
        keys,
      );
      keys.forEach((key, i) => {
        expect(named[i]!.labels, key).toBe(1);
        expect(named[i]!.aria, key).toBeTruthy();
      });
      await expectSliderTexts(page, 'before the keyboard');
      // each press: locator.press focuses the element and presses the key; stateAfter waits for the
      // update it starts and reads the state, which is the state before the next press
      let state = await pageState(page);
      for (const key of keys) {
        for (const [el, press] of [
          [page.locator(`input[data-key="${key}"]`), 'ArrowUp'],
          [page.locator(`input[data-slider-for="${key}"]`), 'ArrowLeft'],
        ] as const) {
          const { text: text0, updates: before } = state;
          await el.press(press);
          state = await stateAfter(page, before);
          warmTimes.push(state.updateMs);
          expect(state.text, `${key} ${press}`).not.toBe(text0);
        }
      }
      // after all of it the page still equals the commands on what it writes, and each slider says the value its field holds
      expectSameOutputs(await outputsOf(page), await writtenBack(`keyboard-${sample}`), 'after the keyboard');
      await expectSliderTexts(page, 'after the keyboard');
    });

    test.runIf(sample === 'halpha-narrowband.yaml')(
      'the survey file panel, closed, holds the file with the current settings, as open and as the button writes it (failed before: the first file)',
      async () => {
        const r = await sampleExplorePage(sample);
        const p = await context.newPage();
        await p.goto(pathToFileURL(r.out).href, { waitUntil: 'load' });
        await p.waitForFunction(() => document.body.dataset.ready === 'true');
        const original = readFileSync(`samples/${sample}`, 'utf8');
        expect(await p.textContent('#survey-yaml')).toBe(original);
        const area = Number(await p.$eval('input[data-key="area"]', (e) => (e as unknown as Field).value));
        await setControl(p, 'area', area * 0.5);
        // the panel is still closed; its text (what a script or a screen reader reads) is the file as now set
        expect(await p.$eval('#survey-panel', (e) => (e as unknown as { open: boolean }).open)).toBe(false);
        const closed = (await p.textContent('#survey-yaml'))!;
        expect(closed).not.toBe(original);
        expect(closed).toContain(`area: ${area * 0.5}`);
        const [download] = await Promise.all([p.waitForEvent('download'), p.click('#write-survey')]);
        expect(readFileSync(await download.path(), 'utf8')).toBe(closed);
        // a second change with the panel still closed, then opened: the same text open as closed
        await setControl(p, 'area', area * 0.25);
        const closed2 = (await p.textContent('#survey-yaml'))!;
        expect(closed2).toContain(`area: ${area * 0.25}`);
        await p.click('#survey-panel summary');
        expect(await p.$eval('#survey-panel', (e) => (e as unknown as { open: boolean }).open)).toBe(true);
        expect(await p.textContent('#survey-yaml')).toBe(closed2);
        // the numbers shown are those of the text the panel holds
        const file = join(dir, 'closed-panel.yaml');
        writeFileSync(file, closed2);
        expectSameOutputs(await outputsOf(p), await expectedOutputs(file), 'closed panel');
        await p.close();
      },
    );

    test.runIf(sample === 'halpha-narrowband.yaml')(
      'an update that fails puts the settings back at those of the numbers shown: controls, numbers, panel and written file agree (failed before: the panel and the numbers of the old settings, the control and the written file of the new)',
      async () => {
        const r = await sampleExplorePage(sample);
        const p = await context.newPage();
        await p.goto(pathToFileURL(r.out).href, { waitUntil: 'load' });
        await p.waitForFunction(() => document.body.dataset.ready === 'true');
        const fieldValue = (key: string) =>
          p.$eval(`input[data-key="${key}"]`, (e) => Number((e as unknown as Field).value));
        const sliderValue = (key: string) =>
          p.$eval(`input[data-slider-for="${key}"]`, (e) => Number((e as unknown as Field).value));
        const area = await fieldValue('area');
        await setControl(p, 'area', area * 0.5);
        const good = (await p.textContent('#survey-yaml'))!;
        expect(good).toContain(`area: ${area * 0.5}`);
        const numbers = await outputsOf(p);
        const slider = await sliderValue('area');
        // an update that throws (every copy of the file's settings refused, as an unexpected
        // failure of the engine would be; the page's own global, put back below)
        await p.evaluate(`(() => {
          window.keptClone = window.structuredClone;
          window.structuredClone = () => { throw new Error('a failure made by the test'); };
        })()`);
        await setControl(p, 'area', area * 0.25);
        await p.evaluate('window.structuredClone = window.keptClone');
        const status = (await p.textContent('#status'))!;
        expect(status).toContain('The update failed: a failure made by the test.');
        expect(status).toContain('back at those of the numbers shown');
        // the control, its slider, the numbers and the panel: all those of the last good settings
        expect(await fieldValue('area')).toBe(area * 0.5);
        expect(await sliderValue('area')).toBe(slider);
        await expectSliderTexts(p, 'after a failed update');
        expect(await outputsOf(p)).toEqual(numbers);
        expect(await p.textContent('#survey-yaml')).toBe(good);
        // and the button writes that file, whose numbers (by the commands) are those shown
        const [download] = await Promise.all([p.waitForEvent('download'), p.click('#write-survey')]);
        expect(readFileSync(await download.path(), 'utf8')).toBe(good);
        const file = join(dir, 'after-failure.yaml');
        writeFileSync(file, good);
        expectSameOutputs(await outputsOf(p), await expectedOutputs(file), 'after a failed update');
        // the next change starts from there and updates as any other
        await setControl(p, 'area', area * 0.25);
        expect(await p.textContent('#survey-yaml')).toContain(`area: ${area * 0.25}`);
        expect(await p.textContent('#status')).toBe('');
        await p.close();
      },
    );

    test.runIf(sample === 'narrowband-interlopers.yaml')(
      'a plan file: the exposure per pointing sets the area and the limit; the page equals the commands on what it writes',
      async () => {
        // `explore samples/plan-halpha-layers.yaml --out FILE`, run once and shared with test/explore/page.test.ts
        const r = await sampleExplorePage('plan-halpha-layers.yaml');
        expect(r.code, r.stderr).toBe(0);
        const p = await context.newPage();
        await p.goto(pathToFileURL(r.out).href, { waitUntil: 'load' });
        await p.waitForFunction(() => document.body.dataset.ready === 'true');
        await p.click('#survey-panel summary');
        await setControl(p, 'plan.exposure_per_pointing', 4);
        // 80 h / (4 h + 0.1 h overhead) = 19 pointings of 0.2 deg^2; background-limited depth halves 6e-17 at 4 h (see page.test.ts)
        expect(Number(await p.$eval('input[data-key="area"]', (e) => (e as unknown as Field).value))).toBeCloseTo(
          3.8,
          12,
        );
        expect(
          Number(await p.$eval('input[data-key="detection.limit"]', (e) => (e as unknown as Field).value)) / 3e-17,
        ).toBeCloseTo(1, 12);
        // the area and limit sliders, set by the exposure, say their new values too
        await expectSliderTexts(p, 'plan exposure');
        const text = (await p.textContent('#survey-yaml'))!;
        // the completeness curve moves with the limit, as plan's designs move it: half 5e-17 at the
        // file's 4e-17, so 3.75e-17 at 3e-17 (docs/outputs.md, explore)
        const half = /half: ([^,]+),/.exec(text)![1]!;
        expect(Number(half) / 3.75e-17).toBeCloseTo(1, 12);
        const file = join(dir, 'plan-written.yaml');
        writeFileSync(file, text);
        expectSameOutputs(await outputsOf(p), await expectedOutputs(file), 'plan exposure');
        // the limit then moved by hand: the curve goes back to where the file puts it
        await setControl(p, 'detection.limit', 3.5e-17);
        const byHand = (await p.textContent('#survey-yaml'))!;
        expect(byHand).toContain('half: 5e-17,');
        const file2 = join(dir, 'plan-written-by-hand.yaml');
        writeFileSync(file2, byHand);
        expectSameOutputs(await outputsOf(p), await expectedOutputs(file2), 'plan exposure, then the limit by hand');
        await p.close();
      },
    );

    test.runIf(sample === 'narrowband-interlopers.yaml')(
      'a model with its uncertainty: the model numbers pending, then drawn after the rest; the page equals the commands on what it writes',
      async () => {
        const r = await sampleExplorePage('plan-robust-uv-slope.yaml');
        expect(r.code, r.stderr).toBe(0);
        const p = await context.newPage();
        await p.goto(pathToFileURL(r.out).href, { waitUntil: 'load' });
        await p.waitForFunction(() => document.body.dataset.ready === 'true');
        await p.click('#survey-panel summary');
        // (a string: the page's globals, which the project's types do not declare) whether a
        // model number was shown pending while the rest were drawn
        await p.evaluate(`(() => {
          window.sawPending = false;
          new MutationObserver(() => {
            if (document.querySelector('[data-output="total-model"][data-pending="true"]') && document.querySelector('[data-output="total-count"][data-value]'))
              window.sawPending = true;
          }).observe(document.body, { subtree: true, childList: true });
        })()`);
        await setControl(p, 'detection.limit', 28.7);
        expect(await p.evaluate('window.sawPending')).toBe(true);
        expect(await p.$$('[data-pending]')).toEqual([]);
        expect(Number(await p.evaluate(() => document.body.dataset.modelMs))).toBeGreaterThan(0);
        const text = (await p.textContent('#survey-yaml'))!;
        const file = join(dir, 'robust-written.yaml');
        writeFileSync(file, text);
        expectSameOutputs(await outputsOf(p), await expectedOutputs(file), 'model moved');
        await p.close();
      },
    );

    test('live outputs are announced (aria-live) and there was no console error and no request', async () => {
      expect(await page.getAttribute('#outputs', 'aria-live')).toBe('polite');
      expect(errors).toEqual([]);
      expect(requests).toEqual([]);
    });
  });
});
