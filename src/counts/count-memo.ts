/**
 * The count engine's results kept from one prediction to the next (the explore page predicts on
 * every change of a control), by everything countPopulation reads except the area: the
 * cosmology, the detection, the population, the slice edges, the histogram width and the
 * engine's options (engine.ts reads nothing else of the survey but its file's name, for
 * messages). The area enters the engine only as the factor area_sr of every volume weight
 * (volume elements, counts, histogram bins, luminosities, the redshift profiles, the nodes
 * kept for the model's draws and what each node adds, which photometric redshifts weight), so results kept for one area serve another, each of those times
 * the ratio of the areas; the scaled results equal the engine's for the new area to rounding
 * (test/explore/page-memo.test.ts: every output of the explore page on every sample and
 * control, 1e-12).
 *
 * Every reader gets its own copy (predict adds to and deletes from the slices it is given). The
 * key is the JSON of those inputs: the survey model is plain data but for the parameters in z,
 * whose JSON is what the file said (ZParam.source), from which they are built.
 */
import type { FlatCosmology } from '../cosmology/flat-cosmology.js';
import type { Population } from '../model/population.js';
import type { Survey } from '../model/survey.js';
import { countPopulation, type EngineOptions, type NodeState, type SliceCount } from './engine.js';

/**
 * The key of a memo's inputs: their JSON, with every non-finite number written as itself (JSON
 * writes each as null).
 */
export function memoKey(inputs: unknown[]): string {
  return JSON.stringify(inputs, (_key, value: unknown) =>
    typeof value === 'number' && !Number.isFinite(value) ? `${value}` : value,
  );
}

/**
 * Results kept by a key, each with the area it was made for, read at any area through `scale`
 * (value, ratio of the areas); the last `size` used are kept (the oldest is the first dropped).
 */
export class KeptByArea<T> {
  private readonly entries = new Map<string, { areaSr: number; value: T }>();

  constructor(
    private readonly size: number,
    private readonly scale: (value: T, ratio: number) => T,
  ) {}

  /** The value kept for `key`, scaled to `areaSr`; else make() (kept as `keep` of it), returned as made. */
  get(key: string, areaSr: number, make: () => T, keep: (made: T) => T = (v) => v): T {
    const kept = this.entries.get(key);
    if (kept) {
      // the last used last: the oldest is the first dropped
      this.entries.delete(key);
      this.entries.set(key, kept);
      return this.scale(kept.value, areaSr / kept.areaSr);
    }
    const made = make();
    if (this.entries.size >= this.size) this.entries.delete(this.entries.keys().next().value!);
    this.entries.set(key, { areaSr, value: keep(made) });
    return made;
  }
}

/** Slices remembered (each slice on its own): a page's populations at a few settings each. */
const ENTRIES = 1024;

export class CountMemo {
  private readonly kept = new KeptByArea<SliceCount>(ENTRIES, scaledSlice);

  /** The key of every input but the area and the slice edges. */
  static key(survey: Survey, population: Population, options: EngineOptions): string {
    return memoKey([
      survey.cosmology,
      survey.detection,
      population,
      survey.histogramWidth,
      !!options.noHistogram,
      !!options.profile,
      !!options.drawNodes,
      !!options.nodeDetail,
    ]);
  }

  /**
   * countPopulation(survey, population, cosmo, edges, options), from the results kept for the
   * same inputs at any area when there are some (options with offsets are counted). Every reader
   * gets its own copy. The engine counts each slice on its own (nothing but the edges of a slice
   * reaches its numbers; engine.ts), so slices are kept one by one: a change of the window's end
   * counts only the slices whose edges moved, each by the engine on those edges alone (in order,
   * so that an input error is the one the whole count meets first). A population with
   * model_uncertainty is counted with its nodes for the model's draws (`drawNodes`) whether asked
   * or not, and its slices handed out without them when not asked: the nodes change nothing else
   * the engine returns, and the page's prediction without the model's draws (its first numbers)
   * and the one with them (src/library/explore/engine.ts) then read one count.
   */
  count(
    survey: Survey,
    population: Population,
    cosmo: FlatCosmology,
    edges: readonly number[],
    options: EngineOptions = {},
  ): SliceCount[] {
    if (options.offsets) return countPopulation(survey, population, cosmo, edges, options);
    const asked = !!options.drawNodes;
    const counted = population.modelUncertainty !== undefined ? { ...options, drawNodes: true } : options;
    const common = CountMemo.key(survey, population, counted);
    const out: SliceCount[] = [];
    for (let s = 0; s + 1 < edges.length; s++) {
      const pair = [edges[s]!, edges[s + 1]!];
      const slice = this.kept.get(
        `${common} ${memoKey(pair)}`,
        survey.areaSr,
        () => countPopulation(survey, population, cosmo, pair, counted)[0]!,
        (made) => scaledSlice(made, 1),
      );
      if (!asked) delete slice.drawNodes;
      out.push(slice);
    }
    return out;
  }
}

/** The count engine, through `memo` when there is one. */
export function countWith(memo: CountMemo | undefined): typeof countPopulation {
  return memo ? memo.count.bind(memo) : countPopulation;
}

const times = (xs: readonly number[], r: number): number[] => xs.map((x) => x * r);

function scaledNode(nd: NodeState, r: number): NodeState {
  return {
    ...nd,
    volumeWeight: nd.volumeWeight * r,
    components: nd.components.map((c) => ({ ...c })),
    allComponents: nd.allComponents.map((c) => ({ ...c })),
  };
}

/** A copy of `s` for an area `r` times its own (r = 1: a plain copy). */
export function scaledSlice(s: SliceCount, r: number): SliceCount {
  const out: SliceCount = {
    zMin: s.zMin,
    zMax: s.zMax,
    volumeMpc3: s.volumeMpc3 * r,
    count: s.count * r,
    limitAtCenter: s.limitAtCenter,
    histogram: { variable: s.histogram.variable, edges: [...s.histogram.edges], counts: times(s.histogram.counts, r) },
  };
  if (s.luminosity) {
    out.luminosity = { detected: s.luminosity.detected * r };
    if (s.luminosity.total !== undefined) out.luminosity.total = s.luminosity.total * r;
  }
  if (s.profile) {
    out.profile = { z: [...s.profile.z], count: times(s.profile.count, r), volumeMpc3: times(s.profile.volumeMpc3, r) };
    if (s.profile.selected) out.profile.selected = [...s.profile.selected];
  }
  if (s.drawNodes) out.drawNodes = s.drawNodes.map((nd) => scaledNode(nd, r));
  if (s.nodes) {
    const nd = s.nodes;
    out.nodes = {
      z: [...nd.z],
      volumeMpc3: times(nd.volumeMpc3, r),
      count: times(nd.count, r),
      bins: nd.bins.map((row) => times(row, r)),
      detected: times(nd.detected, r),
    };
    if (nd.total) out.nodes.total = times(nd.total, r);
  }
  return out;
}
