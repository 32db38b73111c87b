/**
 * Propagation of distributions by the Monte Carlo method beside the GUM budget.
 * Source: JCGM 101:2008 (GUM Supplement 1): §7.2–7.6 draws and model values, §7.7.2 the shortest coverage
 * interval from the sorted model values (q = pM, or ⌊pM + ½⌋ when pM is not an integer), §8 validation of the
 * GUM uncertainty framework: d_low = |y − U_p − y_low|, d_high = |y + U_p − y_high|, validated when both ≤ δ, the
 * numerical tolerance of u(y) at n_dig significant digits (u(y) = c × 10^ℓ, c an n_dig-digit integer, δ = ½·10^ℓ).
 * GUM 95 % interval for the comparison: y ± 1.96·u_c (normal output, coverage probability p = 0.95, JCGM 100 G.6 /
 * JCGM 101 §8); the k = 2 interval the record prints is the same budget at ≈ 95.45 %.
 *
 * n_dig defaults to 1: a fixed run of 10⁵ trials resolves the ends of a 95 % interval to about 1–2 significant
 * digits of u (METROLOGY §5.6: JCGM 101 asks for ~10⁶ trials for 2 digits), so the comparison at 1 digit is the one
 * 10⁵ trials support; on QUAM A1 the GUM interval is validated at 1 digit and not at 2 (METROLOGY §5.6).
 *
 * Inputs: the same inputs, values and standard uncertainties as the GUM budget, each with the distribution the
 * budget states: normal N(x, u²), rectangular x ± u√3, triangular x ± u√6 (symmetric). Inputs are independent.
 *
 * Plain JS numbers inside the trials (not decimal.js): 10⁵ model evaluations in decimal arithmetic take seconds,
 * and the Monte Carlo result is compared with the GUM result at 1–2 significant digits of u, far above the 1e-16
 * relative resolution of a double. Values enter and leave as decimal strings (Dec at the boundary).
 *
 * PRNG: xoshiro128** 1.1 (D. Blackman and S. Vigna, "Scrambled linear pseudorandom number generators", ACM TOMS
 * 47 (2021); public-domain reference code at prng.di.unimi.it), seeded by splitmix32 so any 32-bit seed gives a
 * well-mixed state; normal deviates by the Box–Muller transform (JCGM 101 C.4). Same seed, same trials, same
 * inputs → the same result on every machine.
 */
import { D, type Dec } from './decimal.ts';
import { CalcError } from './errors.ts';
import type { InputDistribution } from './uncertainty.ts';

export const MC_METHOD = 'JCGM 101:2008 Monte Carlo, xoshiro128**';
export const MC_DEFAULT_TRIALS = 100_000;
export const MC_MIN_TRIALS = 1_000;
export const MC_MAX_TRIALS = 1_000_000;
/** k for a 95 % interval of a normal output (JCGM 100 G.6), for the comparison with the GUM interval */
export const GUM_K95 = 1.959963984540054;

export interface McInput {
  name: string;
  value: Dec;
  standardUncertainty: Dec;
  distribution: InputDistribution;
}

/** The model in plain numbers over the named inputs, its GUM result and unit (built by preparation.ts / dilution.ts). */
export interface McModel {
  inputs: McInput[];
  model: (x: Record<string, number>) => number;
  gum: { value: Dec; standardUncertainty: Dec };
  unit: string;
}

export interface McOptions {
  trials?: number;
  seed?: number;
  /** significant digits of u(y) regarded as meaningful (JCGM 101 §8); default 1 (see the header) */
  ndig?: number;
  bins?: number;
}

export interface McHistogramBin {
  low: string;
  high: string;
  count: number;
}

export interface McResultText {
  method: string;
  trials: string;
  seed: string;
  unit: string;
  mean: string;
  standardUncertainty: string;
  interval95: { low: string; high: string };
  gum: { value: string; standardUncertainty: string; k: string; interval95: { low: string; high: string } };
  validation: { ndig: number; tolerance: string; dLow: string; dHigh: string };
  agreesWithGum: boolean;
  histogram: McHistogramBin[];
}

// ------------------------------------------------------------------ PRNG

/** splitmix32 (public domain, after Steele, Lea and Flood's SplitMix): four well-mixed words from one seed. */
function splitmix32(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (s + 0x9e3779b9) >>> 0;
    let z = s;
    z = Math.imul(z ^ (z >>> 16), 0x85ebca6b) >>> 0;
    z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35) >>> 0;
    return (z ^ (z >>> 16)) >>> 0;
  };
}

/** xoshiro128** 1.1: 32-bit outputs, period 2^128 − 1 (Blackman and Vigna, reference C code translated). */
export function xoshiro128ss(seed: number): () => number {
  const sm = splitmix32(seed);
  let a = sm();
  let b = sm();
  let c = sm();
  let d = sm();
  if ((a | b | c | d) === 0) a = 1;
  return () => {
    const r = Math.imul(rotl(Math.imul(b, 5), 7), 9) >>> 0;
    const t = b << 9;
    c ^= a;
    d ^= b;
    b ^= c;
    a ^= d;
    c ^= t;
    d = rotl(d, 11);
    return r;
  };
}

function rotl(x: number, k: number): number {
  return (x << k) | (x >>> (32 - k));
}

/** Uniform on the open interval (0, 1): (n + ½)/2³², never 0 (so Box–Muller's log is finite). */
export function uniform01(next: () => number): () => number {
  return () => (next() + 0.5) / 4294967296;
}

// ------------------------------------------------------------------ numerical tolerance (JCGM 101 §8.2)

/** δ = ½·10^ℓ with z = c × 10^ℓ, c an n_dig-digit integer (z ≠ 0). */
export function numericalTolerance(z: Dec, ndig: number): Dec {
  if (z.isZero()) return new D(0);
  const l = z.abs().log(10).floor().minus(ndig - 1);
  return new D(10).pow(l).div(2);
}

// ------------------------------------------------------------------ the run

export function checkTrials(trials: number): void {
  if (!Number.isInteger(trials) || trials < MC_MIN_TRIALS || trials > MC_MAX_TRIALS) {
    throw new CalcError('calc_out_of_range', `Trials must be a whole number from ${MC_MIN_TRIALS.toLocaleString('en')} to ${MC_MAX_TRIALS.toLocaleString('en')} (got ${trials})`, {
      field: 'monteCarlo.trials',
    });
  }
}

/** Draw M values of the output (Float64Array, unsorted) from the inputs' distributions. */
export function drawOutput(m: McModel, trials: number, seed: number): Float64Array {
  const u01 = uniform01(xoshiro128ss(seed));
  const n = m.inputs.length;
  const names = m.inputs.map((i) => i.name);
  const mean = m.inputs.map((i) => i.value.toNumber());
  const u = m.inputs.map((i) => i.standardUncertainty.toNumber());
  const kind = m.inputs.map((i) => (i.standardUncertainty.isZero() ? 0 : i.distribution === 'normal' ? 1 : i.distribution === 'rectangular' ? 2 : 3));
  const halfWidth = m.inputs.map((i, j) => (i.distribution === 'rectangular' ? u[j] * Math.sqrt(3) : i.distribution === 'triangular' ? u[j] * Math.sqrt(6) : 0));
  // draws column by column (one tight loop per input), then the model trial by trial
  const cols: Array<Float64Array | null> = kind.map(() => null);
  let spare = NaN;
  for (let j = 0; j < n; j++) {
    const k = kind[j];
    if (k === 0) continue;
    const col = new Float64Array(trials);
    const mu = mean[j];
    const s = u[j];
    const a = halfWidth[j];
    if (k === 1) {
      for (let t = 0; t < trials; t++) {
        let z: number;
        if (spare === spare) {
          z = spare;
          spare = NaN;
        } else {
          // Box–Muller: two independent standard normal deviates from two uniforms
          const r = Math.sqrt(-2 * Math.log(u01()));
          const th = 2 * Math.PI * u01();
          z = r * Math.cos(th);
          spare = r * Math.sin(th);
        }
        col[t] = mu + s * z;
      }
    } else if (k === 2) {
      for (let t = 0; t < trials; t++) col[t] = mu + a * (2 * u01() - 1);
    } else {
      // the sum of two uniforms on (0, 1) is triangular on (0, 2) with its peak at 1
      for (let t = 0; t < trials; t++) col[t] = mu + a * (u01() + u01() - 1);
    }
    cols[j] = col;
  }
  const x: Record<string, number> = {};
  for (let j = 0; j < n; j++) x[names[j]] = mean[j];
  const drawn = cols.map((c, j) => [names[j], c] as const).filter((e): e is readonly [string, Float64Array] => e[1] !== null);
  const y = new Float64Array(trials);
  for (let t = 0; t < trials; t++) {
    for (let j = 0; j < drawn.length; j++) x[drawn[j][0]] = drawn[j][1][t];
    const yt = m.model(x);
    if (!Number.isFinite(yt)) {
      throw new CalcError('calc_out_of_range', `The model has no finite value for a draw of the inputs (${names.map((nm) => `${nm} = ${x[nm]}`).join(', ')}); an input's distribution reaches a value the model cannot take`, {
        field: 'monteCarlo',
      });
    }
    y[t] = yt;
  }
  return y;
}

/** JCGM 101 §7.7.2: the shortest interval holding q = pM (or ⌊pM + ½⌋) sorted values. */
export function shortestInterval(sorted: Float64Array, p = 0.95): { low: number; high: number } {
  const M = sorted.length;
  const pm = p * M;
  const q = Number.isInteger(pm) ? pm : Math.floor(pm + 0.5);
  let best = 0;
  let width = Infinity;
  for (let r = 0; r + q < M; r++) {
    const w = sorted[r + q] - sorted[r];
    if (w < width) {
      width = w;
      best = r;
    }
  }
  return { low: sorted[best], high: sorted[Math.min(best + q, M - 1)] };
}

/** Monte Carlo values carry 8 significant digits in text (beyond the method's resolution; for display and storage). */
function txt(v: number | Dec): string {
  return new D(v).toSignificantDigits(8).toFixed();
}

export function runMonteCarlo(m: McModel, opts: McOptions = {}): McResultText {
  const trials = opts.trials ?? MC_DEFAULT_TRIALS;
  checkTrials(trials);
  const seed = opts.seed ?? 1;
  if (!Number.isInteger(seed) || seed < 0 || seed > 0xffffffff) {
    throw new CalcError('calc_out_of_range', `The seed must be a whole number from 0 to 4294967295 (got ${seed})`, { field: 'monteCarlo.seed' });
  }
  const ndig = opts.ndig ?? 1;
  const y = drawOutput(m, trials, seed);
  // mean and standard deviation (JCGM 101 §7.6), two passes for accuracy
  let sum = 0;
  for (let i = 0; i < trials; i++) sum += y[i];
  const mean = sum / trials;
  let ss = 0;
  for (let i = 0; i < trials; i++) ss += (y[i] - mean) ** 2;
  const sd = Math.sqrt(ss / (trials - 1));
  y.sort();
  const iv = shortestInterval(y, 0.95);

  const gy = m.gum.value;
  const gu = m.gum.standardUncertainty;
  const Up = gu.mul(GUM_K95);
  const gLow = gy.minus(Up);
  const gHigh = gy.plus(Up);
  const delta = numericalTolerance(gu, ndig);
  const dLow = gLow.minus(iv.low).abs();
  const dHigh = gHigh.minus(iv.high).abs();
  const agrees = dLow.lte(delta) && dHigh.lte(delta);

  // histogram over the span of the draws and the GUM interval, so both intervals fit on the chart
  const bins = opts.bins ?? 40;
  const lo = Math.min(y[0], gLow.toNumber());
  const hi = Math.max(y[trials - 1], gHigh.toNumber());
  const width = (hi - lo) / bins || 1;
  const counts = new Array<number>(bins).fill(0);
  for (let i = 0; i < trials; i++) counts[Math.min(bins - 1, Math.floor((y[i] - lo) / width))]++;

  return {
    method: MC_METHOD,
    trials: String(trials),
    seed: String(seed),
    unit: m.unit,
    mean: txt(mean),
    standardUncertainty: txt(sd),
    interval95: { low: txt(iv.low), high: txt(iv.high) },
    gum: { value: txt(gy), standardUncertainty: txt(gu), k: '1.96', interval95: { low: txt(gLow), high: txt(gHigh) } },
    validation: { ndig, tolerance: delta.toFixed(), dLow: txt(dLow), dHigh: txt(dHigh) },
    agreesWithGum: agrees,
    histogram: counts.map((count, i) => ({ low: txt(lo + i * width), high: txt(lo + (i + 1) * width), count })),
  };
}
