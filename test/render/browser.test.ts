/**
 * The report in a real headless browser (Debian's chromium, driven by playwright-core):
 * no console error, every figure drawn with a size, no request beyond the document itself,
 * hostile titles shown as text and never run. Writes test-output/report.html and
 * test-output/report.png. Skipped, with a message, only when /usr/bin/chromium is absent
 * (.ci/chromium.sh installs it on CI).
 */
import { existsSync, mkdirSync, rmSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { pathToFileURL } from 'node:url';
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { chromium, type BrowserContext, type Page } from 'playwright-core';
import { buildFigures } from '../../src/render/figures.js';
import { renderReport } from '../../src/render/report.js';
import type { Figure } from '../../src/render/types.js';
import { demoForecast, demoPlan, demoPrediction } from './demo.js';
import { tempDir } from '../support/temp.js';

const CHROMIUM = '/usr/bin/chromium';
const haveChromium = existsSync(CHROMIUM);
if (!haveChromium) {
  console.warn(`browser test skipped: ${CHROMIUM} is absent (CI installs it with .ci/chromium.sh)`);
}

const HOSTILE = `Demo field <script>window.__pwned = 1</script> "><img src=x onerror="window.__pwned=2"> </svg><script>window.__pwned=3</script>`;
const SURVEY_TEXT = `format: 1
title: 'Demo field <script>window.__pwned = 4</script>'
area: 2.5
redshift: {min: 0.8, max: 1.6}
detection: {kind: line_flux, limit: 5e-17, line: 6563}
population:
  shape: schechter
  variable: luminosity
  phi_star: 6.0e-4
  log10_l_star: "42.4 + 0.3*(z - 0.8)"
  alpha: {table: [[0.8, -1.5], [1.6, -1.6]]}
slices: {count: 10}
`;

describe.skipIf(!haveChromium)('report in headless chromium', () => {
  let context: BrowserContext;
  let page: Page;
  let userData: string;
  let figures: Figure[];
  const requests: string[] = [];
  const consoleErrors: string[] = [];
  const pageErrors: string[] = [];
  let docUrl: string;

  beforeAll(async () => {
    const prediction = demoPrediction({ title: HOSTILE });
    figures = await buildFigures({ prediction, forecast: demoForecast(), plan: demoPlan() });
    const html = renderReport({
      surveyText: SURVEY_TEXT,
      surveyTitle: HOSTILE,
      surveyFile: 'demo.yaml',
      prediction,
      forecast: demoForecast(),
      plan: demoPlan(),
      figures,
    });
    const out = resolve('test-output');
    mkdirSync(out, { recursive: true });
    const file = join(out, 'report.html');
    writeFileSync(file, html);
    docUrl = pathToFileURL(file).href;

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
        '--disable-quic',
      ],
      viewport: { width: 1280, height: 900 },
    });
    page = context.pages()[0] ?? (await context.newPage());
    page.on('request', (r) => {
      const u = r.url();
      if (u !== docUrl && !u.startsWith('data:')) requests.push(u);
    });
    page.on('console', (m) => {
      if (m.type() === 'error') consoleErrors.push(m.text());
    });
    page.on('pageerror', (e) => pageErrors.push(String(e)));
    await page.goto(docUrl, { waitUntil: 'load' });
  });

  afterAll(async () => {
    await context?.close();
    if (userData) rmSync(userData, { recursive: true, force: true });
  });

  test('no console error and no page error', () => {
    expect(consoleErrors).toEqual([]);
    expect(pageErrors).toEqual([]);
  });

  test('every figure is present with a non-zero size', async () => {
    expect(figures.length).toBe(5);
    for (const f of figures) {
      const svg = page.locator(`#figure-${f.name} > svg`);
      await expect(svg.count()).resolves.toBe(1);
      const box = await svg.boundingBox();
      expect(box, f.name).not.toBeNull();
      expect(box!.width).toBeGreaterThan(100);
      expect(box!.height).toBeGreaterThan(100);
      // the browser parsed it as SVG (namespace given by the HTML parser) with drawn marks
      const marks = await svg.evaluate((el) => ({
        ns: el.namespaceURI,
        paths: el.querySelectorAll('path, line, text').length,
      }));
      expect(marks.ns).toBe('http://www.w3.org/2000/svg');
      expect(marks.paths).toBeGreaterThan(10);
    }
  });

  test('no network request: only the document itself was loaded', () => {
    expect(requests).toEqual([]);
  });

  test('hostile titles are shown as text and never run', async () => {
    expect(await page.evaluate(() => (globalThis as unknown as { __pwned?: number }).__pwned)).toBeUndefined();
    expect(await page.locator('script').count()).toBe(0);
    expect(await page.locator('img').count()).toBe(0);
    expect(await page.locator('#survey-title').textContent()).toBe(HOSTILE);
    expect(await page.title()).toBe(HOSTILE);
    expect(await page.locator('pre.survey').textContent()).toBe(SURVEY_TEXT);
    // the counts figure's title, inside the SVG, reads as the same text, wrapped over lines
    // (never cut: the lines hold every word)
    const svgTitle = page.locator('#figure-counts svg .role-title-text');
    const lines = await svgTitle.locator('tspan').allTextContents();
    expect(lines.length).toBeGreaterThan(2);
    expect(lines.join(' ')).toBe(`${HOSTILE} Expected count per redshift slice`);
    expect(lines.join('')).not.toContain('…');
  });

  test('the model warning and the tables are visible', async () => {
    await expect(page.locator('#model .warning').isVisible()).resolves.toBe(true);
    for (const id of ['predict-table', 'forecast-table', 'plan-table']) {
      const box = await page.locator(`#${id}`).boundingBox();
      expect(box!.height, id).toBeGreaterThan(50);
    }
    expect(await page.locator('#predict-table tbody tr').count()).toBe(10);
  });

  test('screenshot written to test-output/report.png', async () => {
    const path = resolve('test-output/report.png');
    const png = await page.screenshot({ path, fullPage: true });
    expect(png.length).toBeGreaterThan(10_000);
    expect(existsSync(path)).toBe(true);
  });
});
