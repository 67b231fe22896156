/**
 * The explore page's script (bundled into the page by scripts/explore-bundle.mjs): reads the data
 * the command embedded, wires every control, and on each change writes the settings into the
 * survey file's text, runs the engine on that text and redraws the live parts: every number
 * but the model's draws first, then (after a paint, unless a newer change has come) the model's
 * numbers, marked pending meanwhile. Changes that arrive while an update runs are folded into one
 * more update with the latest values; the page is busy (data-busy) until the model's numbers are
 * drawn.
 */
import type { ControlSpec } from '../../model/explore.js';
import { controlSettings, settingsObject, settingsText } from '../../library/explore/settings.js';
import { parseYaml } from '../../survey/yaml.js';
import { exploreInTwo, exploreMemo, type ExploreResult } from '../../library/explore/engine.js';
import {
  assumedHtml,
  figureParts,
  fisherHtml,
  outputsHtml,
  sliderValueText,
  slicesHtml,
  warningsHtml,
} from '../../render/explore/view.js';
import { embeddedFiles } from './read-input.js';

/*
 * The little of the DOM this script uses, declared here rather than through TypeScript's "dom"
 * library, which would put browser globals into the types of every Node module of the program.
 */
interface PageElement {
  textContent: string | null;
  /** Reading it lays the page out (here: the redrawn parts, within the update's measured time). */
  readonly offsetHeight: number;
  outerHTML: string;
  readonly children: { readonly length: number; readonly [i: number]: PageElement | undefined };
  innerHTML: string;
  readonly dataset: Record<string, string | undefined>;
  addEventListener(type: 'input' | 'click', listener: () => void): void;
}
interface InputElement extends PageElement {
  value: string;
  getAttribute(name: string): string | null;
  setAttribute(name: string, value: string): void;
}
interface AnchorElement extends PageElement {
  href: string;
  hidden: boolean;
  readonly download: string;
  click(): void;
}
declare const document: {
  getElementById(id: string): PageElement | null;
  querySelector(selector: string): PageElement | null;
  readonly body: PageElement;
};
declare const CSS: { escape(s: string): string };
declare function requestAnimationFrame(callback: () => void): number;

/** Resolves once the page has painted what was drawn before the call (a frame, then a task after it). */
function painted(): Promise<void> {
  return new Promise((resolve) => requestAnimationFrame(() => setTimeout(resolve, 0)));
}

/** What the command embeds in the page (src/library/explore/page.ts). */
export interface ExplorePageData {
  file: string;
  baseDir: string;
  text: string;
  files: Record<string, string>;
  controls: ControlSpec[];
}

function byId<T extends PageElement>(id: string): T {
  const el = document.getElementById(id);
  if (!el) throw new Error(`the page has no element #${id}`);
  return el as T;
}

function start(): void {
  const data = JSON.parse(byId('explore-data').textContent ?? '{}') as ExplorePageData;
  for (const [path, text] of Object.entries(data.files)) embeddedFiles.set(path, text);
  const values = new Map<string, number>();
  const status = byId('status');
  const raw = parseYaml(data.text, data.file);
  /** The survey file with the current settings, written once per change (the panel, the button). */
  let text: string | undefined = data.text;
  const currentText = (): string => (text ??= settingsText(data.text, data.controls, values));
  const yaml = byId('survey-yaml');
  /**
   * The panel's text, kept current whether the panel is open or closed: a script or a screen
   * reader reading the closed panel reads the file as now set, not the first file (writing the
   * text costs about 0.2 ms of an update of 5-60 ms).
   */
  let shown = data.text;
  const showText = (): void => {
    const t = currentText();
    if (t !== shown) yaml.textContent = shown = t;
  };
  let running = false;
  let pending = false;
  let updates = 0;
  const keep = exploreMemo();
  /** Each live part's HTML as last drawn: a part whose HTML a change leaves as it was is not drawn again. */
  const drawn = new Map<string, string>();
  const redraw = (id: string, html: string): void => {
    if (drawn.get(id) === html) return;
    byId(id).innerHTML = html;
    drawn.set(id, html);
  };
  /** The figures as last drawn, one by one: only those a change alters are drawn again. */
  const figures: string[] = [];
  const redrawFigures = (parts: string[]): void => {
    const box = byId('figures');
    if (parts.length !== figures.length || box.children.length !== parts.length) {
      box.innerHTML = parts.join('');
      figures.splice(0, figures.length, ...parts);
      return;
    }
    parts.forEach((html, i) => {
      if (figures[i] === html) return;
      box.children[i]!.outerHTML = html;
      figures[i] = html;
    });
  };

  /** Every live part of the page from one result. */
  const redrawParts = (r: ExploreResult): void => {
    redraw('outputs', outputsHtml(r));
    redraw('warnings', warningsHtml(r));
    redraw('assumed', assumedHtml(r));
    redraw('slices', slicesHtml(r));
    redraw('fisher', fisherHtml(r));
    redrawFigures(figureParts(r));
  };

  /**
   * The settings of the numbers shown (the values and what each control's field and slider show)
   * and the result drawn of them: after a failed update the page goes back to them, so that the
   * controls, the numbers, the survey file panel and the file the button writes agree.
   */
  interface Shown {
    values: Map<string, number>;
    controls: { key: string; field: string; slider: string; sliderText: string }[];
    result?: ExploreResult;
  }
  const snapshot = (): Shown => ({
    values: new Map(values),
    controls: data.controls.map((c) => ({
      key: c.key,
      field: fieldOf(c.key)?.value ?? '',
      slider: sliderOf(c.key)?.value ?? '',
      sliderText: sliderOf(c.key)?.getAttribute('aria-valuetext') ?? '',
    })),
  });
  let numbersOf: Shown | undefined;

  async function update(): Promise<void> {
    if (running) {
      pending = true;
      return;
    }
    running = true;
    document.body.dataset.busy = 'true';
    /** The settings being computed, and whether their numbers (every one but the model's draws) are drawn. */
    let asked = numbersOf ?? snapshot();
    let drawnFirst = false;
    const draw = (r: ExploreResult): void => {
      redrawParts(r);
      showText();
      status.textContent = r.error ? 'These settings are not a valid survey: see the message under Results.' : '';
      // the layout the redraw needs, done here so that the update's time includes it
      void document.body.offsetHeight;
    };
    try {
      do {
        pending = false;
        drawnFirst = false;
        const t0 = performance.now();
        text = undefined;
        asked = snapshot();
        // every number but the model's draws, shown at once; the draws (as costly as the rest)
        // after the page has painted those, unless a newer change has come meanwhile
        const step = await exploreInTwo(
          { text: '', object: settingsObject(raw, data.controls, values) },
          data.file,
          data.baseDir,
          keep,
        );
        const t1 = performance.now();
        draw(step.result);
        drawnFirst = true;
        numbersOf = { ...asked, result: step.result };
        const t2 = performance.now();
        // the update's time (engine, redraw with its layout) and its two parts
        document.body.dataset.updateMs = String(t2 - t0);
        document.body.dataset.computeMs = String(t1 - t0);
        document.body.dataset.drawMs = String(t2 - t1);
        delete document.body.dataset.modelMs;
        if (!step.model) continue;
        await painted();
        if (pending) continue;
        const t3 = performance.now();
        const full = step.model();
        draw(full);
        numbersOf = { ...asked, result: full };
        // the model's draws and their redraw, after the update
        document.body.dataset.modelMs = String(performance.now() - t3);
      } while (pending);
    } catch (e) {
      const why = e instanceof Error ? e.message : String(e);
      if (drawnFirst) {
        // the settings' numbers are drawn; only the model's draws are missing (still marked pending)
        status.textContent = `The model's draws failed: ${why}. Every other number is that of the settings shown.`;
      } else {
        // back to the settings of the numbers shown (a later change then starts from them)
        pending = false;
        goBack(numbersOf ?? asked);
        status.textContent = `The update failed: ${why}. The settings are back at those of the numbers shown, as are the survey file and the file the button writes.`;
      }
    } finally {
      running = false;
      updates++;
      document.body.dataset.updates = String(updates);
      document.body.dataset.busy = 'false';
    }
  }

  /** The page as it was at `to`: the values, each control's field and slider, the numbers (redrawn where a part was already drawn anew) and the panel. */
  function goBack(to: Shown): void {
    values.clear();
    for (const [k, v] of to.values) values.set(k, v);
    for (const c of to.controls) {
      const field = fieldOf(c.key);
      const slider = sliderOf(c.key);
      if (field) field.value = c.field;
      if (slider) {
        slider.value = c.slider;
        slider.setAttribute('aria-valuetext', c.sliderText);
      }
    }
    text = undefined;
    try {
      if (to.result) redrawParts(to.result);
      showText();
    } catch {
      // the numbers stay as drawn; the status says the update failed
    }
  }

  const fieldOf = (key: string) =>
    document.querySelector(`input[data-key="${CSS.escape(key)}"]`) as InputElement | null;
  const sliderOf = (key: string) =>
    document.querySelector(`input[data-slider-for="${CSS.escape(key)}"]`) as InputElement | null;
  /**
   * Shows `v` in a control's field and slider (without firing anything), and in what the slider
   * says to a screen reader, which a moved slider updates itself (`slider` null).
   */
  const show = (c: ControlSpec, v: number, field = fieldOf(c.key), slider = sliderOf(c.key)): void => {
    if (field) field.value = String(v);
    if (slider) slider.value = String(c.scale === 'log' ? Math.log10(v) : v);
    sliderOf(c.key)?.setAttribute('aria-valuetext', sliderValueText(c, v));
  };
  /** A control set to `v`: a key of the file, or the exposure per pointing, which sets the area and the limit. */
  const set = (c: ControlSpec, v: number): void => {
    if (!c.plan) {
      values.set(c.key, v);
      // a limit set by hand: the completeness curve stays where the file puts it (the exposure
      // control moves it with the limit, as plan's designs do)
      if (c.key === 'detection.limit') for (const x of data.controls) if (x.plan) values.delete(x.key);
      return;
    }
    values.set(c.key, v);
    for (const [key, value] of controlSettings(c, v)) {
      values.set(key, value);
      const other = data.controls.find((x) => x.key === key);
      if (other) show(other, value);
    }
  };
  for (const c of data.controls) {
    const field = fieldOf(c.key);
    const slider = sliderOf(c.key);
    if (!field || !slider) continue;
    field.addEventListener('input', () => {
      const v = field.value.trim() === '' ? NaN : Number(field.value);
      if (!Number.isFinite(v) || (c.plan && !(v > 0))) {
        status.textContent = `${c.label}: type a ${c.plan ? 'positive ' : ''}number.`;
        return;
      }
      show(c, v, null, slider);
      set(c, v);
      void update();
    });
    slider.addEventListener('input', () => {
      const s = Number(slider.value);
      const v = Number((c.scale === 'log' ? 10 ** s : s).toPrecision(6));
      show(c, v, field, null);
      set(c, v);
      void update();
    });
  }

  const link = byId<AnchorElement>('download');
  let url: string | undefined;
  byId('write-survey').addEventListener('click', () => {
    if (url) URL.revokeObjectURL(url);
    const written = currentText();
    showText();
    url = URL.createObjectURL(new Blob([written], { type: 'application/yaml' }));
    link.href = url;
    link.hidden = false;
    link.click();
    status.textContent = `The survey file with these settings is written as ${link.download}.`;
  });
  // the settings of the numbers the page opens on (the file's)
  numbersOf = snapshot();
  document.body.dataset.busy = 'false';
  document.body.dataset.ready = 'true';
}

start();
