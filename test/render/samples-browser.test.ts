/**
 * The report of every sample, made by the real `report` command (run(argv, io); made once per run
 * and shared with test/cli/report.test.ts, see test/support/sample-reports.ts), opened in a
 * real headless browser (Debian's chromium driven by playwright-core, with the flags the report is checked under):
 * no console or page error, every figure drawn with a non-zero size, no request beyond the
 * document, a screenshot in test-output/ (the first screen of each report: a full page costs the
 * browser about a second a report, and test/render/browser.test.ts takes a full-page one of a
 * report; SKYTALLY_FULL_SCREENSHOTS=1 takes full pages here too, for looking at every figure).
 * A survey whose title holds HTML and script, also made
 * through the command, is shown as text and never run. Skipped, with a message, only when
 * /usr/bin/chromium is absent (.ci/run installs it through .ci/chromium.sh).
 */
import { copyFileSync, existsSync, mkdirSync, readFileSync, readdirSync, rmSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { pathToFileURL } from 'node:url';
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { chromium, type BrowserContext } from 'playwright-core';
import { tempDir } from '../support/temp.js';
import { HOSTILE_TITLE, hostileTitleReport, sampleReport } from '../support/sample-reports.js';

const CHROMIUM = '/usr/bin/chromium';
const haveChromium = existsSync(CHROMIUM);
if (!haveChromium)
  console.warn(`browser test skipped: ${CHROMIUM} is absent (.ci/run installs it with .ci/chromium.sh)`);

const OUT = resolve('test-output');
/** Full-page screenshots (every figure) rather than each report's first screen. */
const FULL_PAGES = process.env.SKYTALLY_FULL_SCREENSHOTS === '1';
const SAMPLES = readdirSync('samples')
  .filter((f) => f.endsWith('.yaml'))
  .map((f) => f.replace(/\.yaml$/, ''));
/** Samples with a `plan:` section: their reports hold a plan and a forecast. */
const PLAN_SAMPLES = SAMPLES.filter((s) => /^plan:/m.test(readFileSync(`samples/${s}.yaml`, 'utf8')));
/** Samples whose (first) population is a double Schechter function: no forecast, a sentence instead. */
const DOUBLE_SAMPLES = SAMPLES.filter((s) =>
  /shape:\s*double_schechter/.test(readFileSync(`samples/${s}.yaml`, 'utf8')),
);
/** Samples with photometric-redshift scatter: forecasts count by true redshift, so no forecast, a sentence instead. */
const PHOTO_Z_SAMPLES = SAMPLES.filter((s) =>
  /photo_z: \{sigma: 0\.0*[1-9]/.test(readFileSync(`samples/${s}.yaml`, 'utf8')),
);

/** The little of the DOM the page reads (the project compiles without the DOM library). */
interface PageElement {
  namespaceURI: string | null;
  textContent: string | null;
  getAttribute(name: string): string | null;
  getBoundingClientRect(): { width: number; height: number };
  querySelector(selector: string): PageElement | null;
  querySelectorAll(selector: string): ArrayLike<PageElement> & Iterable<PageElement>;
}
interface PageGlobals {
  document: { title: string; querySelectorAll(selector: string): ArrayLike<PageElement> & Iterable<PageElement> };
  getComputedStyle(el: PageElement): { visibility: string };
  __pwned?: number;
}

interface Opened {
  requests: string[];
  consoleErrors: string[];
  pageErrors: string[];
  figureBoxes: { name: string; width: number; height: number; marks: number }[];
  figureNames: string[];
  pwned: unknown;
  scripts: number;
  images: number;
  title: string | null;
  docTitle: string;
  surveyText: string | null;
  warningVisible: boolean;
  screenshotBytes: number;
  /** Text of the visible "no forecast" / "no plan" sentences, by section id. */
  omitted: Record<string, string>;
  /** Ids of the forecast and plan tables present. */
  tables: string[];
}

describe.skipIf(!haveChromium)('reports made by the command, in headless chromium', () => {
  let context: BrowserContext;
  let userData: string;
  const opened = new Map<string, Opened>();
  let hostileText = '';

  async function open(name: string, htmlPath: string): Promise<Opened> {
    const page = await context.newPage();
    const url = pathToFileURL(htmlPath).href;
    const o: Opened = {
      requests: [],
      consoleErrors: [],
      pageErrors: [],
      figureBoxes: [],
      figureNames: [],
      pwned: undefined,
      scripts: 0,
      images: 0,
      title: null,
      docTitle: '',
      surveyText: null,
      warningVisible: false,
      screenshotBytes: 0,
      omitted: {},
      tables: [],
    };
    page.on('request', (r) => {
      if (r.url() !== url && !r.url().startsWith('data:')) o.requests.push(r.url());
    });
    page.on('console', (m) => {
      if (m.type() === 'error') o.consoleErrors.push(m.text());
    });
    page.on('pageerror', (e) => o.pageErrors.push(String(e)));
    await page.goto(url, { waitUntil: 'load' });
    // Everything read from the page in one call (each call is a round trip to the browser, and a
    // few hundred of them cost more than the rest of this file's browser work). As playwright's
    // locators read them: an element asked for alone must be the only match (its strict mode),
    // and visible means a non-empty bounding box and no visibility: hidden (its isVisible).
    const read = await page.evaluate(() => {
      const g = globalThis as unknown as PageGlobals;
      const one = (selector: string): PageElement => {
        const all = g.document.querySelectorAll(selector);
        if (all.length !== 1) throw new Error(`${selector}: ${all.length} elements, expected one`);
        return all[0]!;
      };
      const visible = (el: PageElement): boolean => {
        const r = el.getBoundingClientRect();
        return r.width > 0 && r.height > 0 && g.getComputedStyle(el).visibility !== 'hidden';
      };
      const figures = [...g.document.querySelectorAll('figure.figure')].map((f) => {
        const svg = f.querySelector(':scope > svg');
        const box = svg?.getBoundingClientRect();
        return {
          id: f.getAttribute('id'),
          width: box?.width ?? 0,
          height: box?.height ?? 0,
          marks:
            svg?.namespaceURI === 'http://www.w3.org/2000/svg' ? svg.querySelectorAll('path, line, text').length : -1,
        };
      });
      const sections = ['forecast', 'plan'].map((id) => {
        const sentence = g.document.querySelectorAll(`#${id}-omitted`).length > 0 ? one(`#${id}-omitted`) : null;
        const table = g.document.querySelectorAll(`#${id}-table`).length > 0 ? one(`#${id}-table`) : null;
        return {
          id,
          omitted: sentence && visible(sentence) ? (sentence.textContent ?? '') : null,
          table: table !== null && visible(table),
        };
      });
      return {
        figures,
        sections,
        pwned: g.__pwned,
        scripts: g.document.querySelectorAll('script').length,
        images: g.document.querySelectorAll('img').length,
        title: one('#survey-title').textContent,
        docTitle: g.document.title,
        surveyText: one('pre.survey').textContent,
        warningVisible: visible(one('#model .warning')),
      };
    });
    for (const f of read.figures) {
      const id = f.id!.replace(/^figure-/, '');
      o.figureNames.push(id);
      o.figureBoxes.push({ name: id, width: f.width, height: f.height, marks: f.marks });
    }
    o.pwned = read.pwned;
    o.scripts = read.scripts;
    o.images = read.images;
    o.title = read.title;
    o.docTitle = read.docTitle;
    o.surveyText = read.surveyText;
    o.warningVisible = read.warningVisible;
    for (const x of read.sections) {
      if (x.omitted !== null) o.omitted[x.id] = x.omitted;
      if (x.table) o.tables.push(`${x.id}-table`);
    }
    o.screenshotBytes = (await page.screenshot({ path: join(OUT, `report-${name}.png`), fullPage: FULL_PAGES })).length;
    await page.close();
    return o;
  }

  beforeAll(async () => {
    mkdirSync(OUT, { recursive: true });
    const jobs: [string, string][] = [];
    // Each sample's report made once per run and shared with test/cli/report.test.ts
    // (test/support/sample-reports.ts); taken in the other order, so that when both files run at
    // once each makes about half. A copy stays in test-output/ beside its screenshot.
    for (const s of [...SAMPLES].reverse()) {
      const made = await sampleReport(`${s}.yaml`);
      if (made.result.code !== 0) throw new Error(`report ${s}: ${made.result.stderr}`);
      const out = join(OUT, `report-${s}.html`);
      copyFileSync(made.html, out);
      jobs.unshift([s, out]);
    }
    // the sample with a title holding HTML and script, its report made once per run and shared
    // with test/cli/report.test.ts (test/support/sample-reports.ts)
    const hostile = await hostileTitleReport();
    if (hostile.result.code !== 0) throw new Error(`report hostile: ${hostile.result.stderr}`);
    hostileText = hostile.text;
    const hostileOut = join(OUT, 'report-hostile-title.html');
    copyFileSync(hostile.html, hostileOut);
    jobs.push(['hostile-title', hostileOut]);

    userData = tempDir('skytally-chromium-');
    context = await chromium.launchPersistentContext(userData, {
      executablePath: CHROMIUM,
      headless: true,
      args: [
        '--headless',
        '--no-sandbox',
        '--disable-gpu',
        '--disable-background-networking',
        '--disable-component-update',
        '--no-first-run',
        '--disable-sync',
      ],
      viewport: { width: 1280, height: 900 },
    });
    for (const [name, path] of jobs) opened.set(name, await open(name, path));
  });

  afterAll(async () => {
    await context?.close();
    if (userData) rmSync(userData, { recursive: true, force: true });
  });

  describe.each([...SAMPLES, 'hostile-title'])('%s', (name) => {
    test('no console error, no page error, no network request', () => {
      const o = opened.get(name)!;
      expect(o.consoleErrors).toEqual([]);
      expect(o.pageErrors).toEqual([]);
      expect(o.requests).toEqual([]);
    });

    test('every figure is present (counts, histograms, luminosity function) with a non-zero size', () => {
      const o = opened.get(name)!;
      // Several populations: one luminosity-function figure each (luminosity-function-1, -2, ...)
      // and the shares per observed bin; lines at other redshifts (the interloper sample): one
      // counts figure per population and no top-level histograms.
      if (name === 'narrowband-interlopers') {
        expect(o.figureNames.slice(0, 4)).toEqual(['counts-1', 'counts-2', 'counts-3', 'luminosity-function-1']);
        expect(o.figureNames).toContain('shares');
      } else {
        expect(o.figureNames.slice(0, 2)).toEqual(['counts', 'histograms']);
        expect(o.figureNames[2]).toMatch(/^luminosity-function(-1)?$/);
      }
      // every single-Schechter sample's report holds its forecast (the Fisher ellipses)
      if (!DOUBLE_SAMPLES.includes(name) && !PHOTO_Z_SAMPLES.includes(name))
        expect(o.figureNames).toContain('forecast');
      for (const b of o.figureBoxes) {
        expect(b.width, b.name).toBeGreaterThan(100);
        expect(b.height, b.name).toBeGreaterThan(100);
        expect(b.marks, b.name).toBeGreaterThan(10);
      }
    });

    test('the assumed-model warning is visible; a screenshot was written', () => {
      const o = opened.get(name)!;
      expect(o.warningVisible).toBe(true);
      expect(o.screenshotBytes).toBeGreaterThan(10_000);
      expect(existsSync(join(OUT, `report-${name}.png`))).toBe(true);
    });
  });

  test('the plan samples exist (two) and one double Schechter sample', () => {
    expect(PLAN_SAMPLES.length).toBeGreaterThanOrEqual(2);
    expect(DOUBLE_SAMPLES.length).toBeGreaterThanOrEqual(1);
  });

  describe.each(PLAN_SAMPLES)('%s (a plan file)', (name) => {
    test('its report holds the forecast and plan figures, with a non-zero size, and their tables', () => {
      const o = opened.get(name)!;
      expect(o.figureNames).toContain('forecast');
      expect(o.figureNames).toContain('plan');
      for (const fig of ['forecast', 'plan']) {
        const b = o.figureBoxes.find((x) => x.name === fig)!;
        expect(b.width, fig).toBeGreaterThan(100);
        expect(b.height, fig).toBeGreaterThan(100);
        expect(b.marks, fig).toBeGreaterThan(10);
      }
      expect(o.tables).toEqual(['forecast-table', 'plan-table']);
      expect(o.omitted).toEqual({});
      expect(o.consoleErrors).toEqual([]);
      expect(o.pageErrors).toEqual([]);
      expect(o.requests).toEqual([]);
    });
  });

  describe.each(DOUBLE_SAMPLES)('%s (double Schechter)', (name) => {
    test('no forecast figure; a visible sentence says why', () => {
      const o = opened.get(name)!;
      expect(o.figureNames).not.toContain('forecast');
      expect(o.omitted.forecast).toMatch(/^No forecast: .*double Schechter/);
    });
  });

  describe.each(PHOTO_Z_SAMPLES)('%s (photometric redshifts)', (name) => {
    test('no forecast figure; a visible sentence says why', () => {
      const o = opened.get(name)!;
      expect(o.figureNames).not.toContain('forecast');
      expect(o.omitted.forecast).toMatch(/^No forecast: .*photo_z/);
    });
  });

  test('a hostile title is shown as text and never run', () => {
    const o = opened.get('hostile-title')!;
    expect(o.pwned).toBeUndefined();
    expect(o.scripts).toBe(0);
    expect(o.images).toBe(0);
    expect(o.title).toBe(HOSTILE_TITLE);
    expect(o.docTitle).toBe(HOSTILE_TITLE);
    expect(o.surveyText).toBe(hostileText);
  });
});
