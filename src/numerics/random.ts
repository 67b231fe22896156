/**
 * Seeded standard normal deviates for the model's draws, the same numbers, bit for bit, as
 * @stdlib/random-base-normal (0.2.2) draws with a @stdlib/random-base-mt19937 (0.2.3) generator's
 * `normalized` as its uniform source, without loading those packages (a bundle of some 280 kB run
 * when loaded: src/forecast/mocks.ts still uses them, and check that they agree is in
 * test/numerics/random.test.ts).
 *
 * - MT19937 (Matsumoto & Nishimura 1998, ACM TOMACS 8, 3): init_genrand for one seed, init_by_array
 *   for several, the tempered 32-bit output; `uniform()` is the 53-bit number on [0, 1) made of two
 *   outputs, (a >>> 5) 2^26 + (b >>> 6) over 2^53 (the reference code's genrand_res53).
 * - Normal deviates: the improved ziggurat (Doornik 2005, "An improved ziggurat method to generate
 *   normal random samples"), 128 blocks, the tail from R = 3.442619855899 by Marsaglia's method
 *   (1964); the block index from a second MT19937 seeded with floor(1 + (2^32 - 1) u), u the first
 *   uniform of the source (as @stdlib seeds it when given a uniform source). The block coordinates
 *   and the wedge test use @stdlib's exp and ln, as @stdlib does, so that every number matches.
 */
import exp from '@stdlib/math-base-special-exp';
import ln from '@stdlib/math-base-special-ln';

const N = 624;
const M = 397;
const UPPER_MASK = 0x80000000;
const LOWER_MASK = 0x7fffffff;
const MATRIX_A = 0x9908b0df;
const UINT32_MAX = 0xffffffff;

/** The Mersenne Twister MT19937 with 32-bit output. */
export class Mt19937 {
  private readonly state = new Uint32Array(N);
  private index = N;

  /** One seed (init_genrand) or several (init_by_array; one element counts as one seed). */
  constructor(seed: number | ArrayLike<number>) {
    if (typeof seed === 'number' || seed.length === 1) {
      this.initGenrand(typeof seed === 'number' ? seed : seed[0]!);
      return;
    }
    this.initGenrand(19650218);
    const st = this.state;
    const len = seed.length;
    let i = 1;
    let j = 0;
    for (let k = Math.max(N, len); k > 0; k--) {
      let s = st[i - 1]!;
      s = (s ^ (s >>> 30)) >>> 0;
      s = Math.imul(s, 1664525) >>> 0;
      st[i] = ((st[i]! ^ s) + (seed[j]! >>> 0) + j) >>> 0;
      i++;
      j++;
      if (i >= N) {
        st[0] = st[N - 1]!;
        i = 1;
      }
      if (j >= len) j = 0;
    }
    for (let k = N - 1; k > 0; k--) {
      let s = st[i - 1]!;
      s = (s ^ (s >>> 30)) >>> 0;
      s = Math.imul(s, 1566083941) >>> 0;
      st[i] = ((st[i]! ^ s) - i) >>> 0;
      i++;
      if (i >= N) {
        st[0] = st[N - 1]!;
        i = 1;
      }
    }
    st[0] = UPPER_MASK;
  }

  private initGenrand(seed: number): void {
    const st = this.state;
    st[0] = seed >>> 0;
    for (let i = 1; i < N; i++) {
      const s = (st[i - 1]! ^ (st[i - 1]! >>> 30)) >>> 0;
      st[i] = (Math.imul(s, 1812433253) >>> 0) + i;
    }
  }

  private twist(): void {
    const st = this.state;
    let i = 0;
    for (; i < N - M; i++) {
      const w = (st[i]! & UPPER_MASK) | (st[i + 1]! & LOWER_MASK);
      st[i] = st[i + M]! ^ (w >>> 1) ^ (w & 1 ? MATRIX_A : 0);
    }
    for (; i < N - 1; i++) {
      const w = (st[i]! & UPPER_MASK) | (st[i + 1]! & LOWER_MASK);
      st[i] = st[i - (N - M)]! ^ (w >>> 1) ^ (w & 1 ? MATRIX_A : 0);
    }
    const w = (st[N - 1]! & UPPER_MASK) | (st[0]! & LOWER_MASK);
    st[N - 1] = st[M - 1]! ^ (w >>> 1) ^ (w & 1 ? MATRIX_A : 0);
  }

  /** The next tempered 32-bit output, 0 to 2^32 - 1. */
  next(): number {
    if (this.index >= N) {
      this.twist();
      this.index = 0;
    }
    let r = this.state[this.index++]!;
    r ^= r >>> 11;
    r ^= (r << 7) & 0x9d2c5680;
    r ^= (r << 15) & 0xefc60000;
    r ^= r >>> 18;
    return r >>> 0;
  }

  /** A uniform number on [0, 1) with 53 random bits. */
  uniform(): number {
    const a = this.next() >>> 5;
    const b = this.next() >>> 6;
    return (a * 67108864 + b) / 9007199254740992;
  }
}

const BLOCKS = 128;
const R_TAIL = 3.442619855899;
/** (R phi(R) + P(X >= R)) sqrt(2 pi): the area of each block. */
const V = 9.91256303526217e-3;

let blocks: { x: Float64Array; ratio: Float64Array } | undefined;

/** The blocks' right edges X (each block of the same area) and X[i + 1] / X[i], made once. */
function zigguratBlocks(): { x: Float64Array; ratio: Float64Array } {
  if (blocks) return blocks;
  const x = new Float64Array(BLOCKS + 1);
  let f = exp(-0.5 * R_TAIL * R_TAIL);
  x[0] = V / f;
  x[1] = R_TAIL;
  for (let i = 2; i < BLOCKS; i++) {
    x[i] = Math.sqrt(-2 * ln(V / x[i - 1]! + f));
    f = exp(-0.5 * x[i]! * x[i]!);
  }
  x[BLOCKS] = 0;
  const ratio = new Float64Array(BLOCKS);
  for (let i = 0; i < BLOCKS; i++) ratio[i] = x[i + 1]! / x[i]!;
  blocks = { x, ratio };
  return blocks;
}

/**
 * A generator of standard normal deviates from a seeded MT19937's uniform numbers (its `uniform`),
 * the improved ziggurat as the module comment describes.
 */
export function normalDeviates(source: Mt19937): () => number {
  const randu = () => source.uniform();
  const index = new Mt19937(Math.floor(1 + UINT32_MAX * randu()));
  const { x: X, ratio: R } = zigguratBlocks();
  return () => {
    for (;;) {
      const u = 2 * randu() - 1;
      const i = index.next() & 127;
      // the rectangles
      if (Math.abs(u) < R[i]!) return u * X[i]!;
      // the bottom block: the tail
      if (i === 0) {
        let t: number;
        let y: number;
        do {
          t = ln(randu()) / R_TAIL;
          y = ln(randu());
        } while (-2 * y < t * t);
        return u < 0 ? t - R_TAIL : R_TAIL - t;
      }
      // the wedges
      const xx = u * X[i]!;
      const x2 = xx * xx;
      const f0 = exp(-0.5 * (X[i]! * X[i]! - x2));
      const f1 = exp(-0.5 * (X[i + 1]! * X[i + 1]! - x2));
      if (f1 + randu() * (f0 - f1) < 1) return xx;
    }
  };
}
