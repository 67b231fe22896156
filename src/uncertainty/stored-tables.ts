/**
 * Tables that depend only on the cosmology, stored for the cosmologies most files name (the
 * presets and h0 = 70, omega_m = 0.3 with the default omega_b, sigma8 and n_s), so that a process
 * predicting for one of them does not make them again at start-up: the unnormalised ln P(k) table
 * with its sigma(8/h Mpc) (power-spectrum.ts) and ln sigma(M, 0) at the halo model's spline knots
 * (haloes.ts). They are the very numbers the code makes (scripts/generate-power-tables.ts runs it
 * and writes them bit for bit into stored-tables.generated.ts; test/uncertainty/stored-tables.test.ts
 * checks them against a fresh computation and that the file is up to date); any other cosmology,
 * and the full (wiggle) form, are computed as before.
 */
import type { Cosmology } from '../model/cosmology.js';
import { STORED_TABLES } from './stored-tables.generated.js';

/** What a spectrum's ln P table needs besides the normalisation (power-spectrum.ts). */
export interface ShapeTable {
  /** ln(k^n_s T(k)^2) on the uniform ln k grid of power-spectrum.ts. */
  readonly lnShape: Float64Array;
  /** sigma(8/h Mpc) of the unnormalised shape (top-hat window). */
  readonly sigma8Unnormalised: number;
}

/** The stored form of one cosmology's tables: numbers as little-endian float64, base64. */
export interface StoredTables {
  lnShape: string;
  sigma8Unnormalised: number;
  lnSigmaM: string;
}

/**
 * The key of a spectrum: its form and every parameter it depends on, each number as JavaScript
 * writes it (which reads back to the same double), so a key names exactly one spectrum.
 */
export function powerKey(c: Cosmology, form: string): string {
  return `${form} ${c.h0} ${c.omegaM} ${c.omegaB} ${c.sigma8} ${c.nS} ${c.tCmb}`;
}

/** Float64Array data are the platform's byte order: the stored bytes are little-endian. */
const LITTLE_ENDIAN = new Uint8Array(new Float64Array([1]).buffer)[7] === 0x3f;

/**
 * The doubles of a base64 text of little-endian float64s: Node's Buffer where there is one (a
 * tenth of a millisecond), atob in browsers (milliseconds when run cold).
 */
export function decodeDoubles(text: string): Float64Array {
  const NodeBuffer = (globalThis as { Buffer?: typeof Buffer }).Buffer;
  const bytes = NodeBuffer ? NodeBuffer.from(text, 'base64') : Uint8Array.from(atob(text), (c) => c.charCodeAt(0));
  const out = new Float64Array(bytes.length / 8);
  new Uint8Array(out.buffer).set(bytes);
  return out;
}

/** The base64 text of doubles, little-endian (decodeDoubles reads it back bit for bit). */
export function encodeDoubles(values: Float64Array): string {
  const bytes = new Uint8Array(values.buffer, values.byteOffset, values.byteLength);
  let s = '';
  for (let i = 0; i < bytes.length; i++) s += String.fromCharCode(bytes[i]!);
  return btoa(s);
}

const decoded = new Map<string, { shape?: ShapeTable; lnSigmaM?: Float64Array }>();

function entry(key: string): { shape?: ShapeTable; lnSigmaM?: Float64Array } | undefined {
  if (!LITTLE_ENDIAN || !Object.prototype.hasOwnProperty.call(STORED_TABLES, key)) return undefined;
  let d = decoded.get(key);
  if (!d) decoded.set(key, (d = {}));
  return d;
}

/** The stored ln P shape table of the spectrum with this key, if there is one. */
export function storedShapeTable(key: string): ShapeTable | undefined {
  const d = entry(key);
  if (!d) return undefined;
  const s = STORED_TABLES[key]!;
  return (d.shape ??= { lnShape: decodeDoubles(s.lnShape), sigma8Unnormalised: s.sigma8Unnormalised });
}

/** The stored ln sigma(M, 0) at the halo model's spline knots for the spectrum with this key. */
export function storedLnSigmaM(key: string): Float64Array | undefined {
  const d = entry(key);
  if (!d) return undefined;
  return (d.lnSigmaM ??= decodeDoubles(STORED_TABLES[key]!.lnSigmaM));
}
