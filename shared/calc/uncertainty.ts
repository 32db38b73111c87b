/**
 * Combined standard uncertainty by the GUM law of propagation of uncertainty (first order).
 * Source: JCGM 100:2008 (GUM) eq. (10) uncorrelated and eq. (13) correlated inputs; Type B
 * conversions rectangular a/√3, triangular a/√6, U/k (GUM 4.3.7, 4.3.9; QUAM conventions).
 * Validity: models that are close to linear within ± u of each input (first-order GUM).
 * Units: the model's output unit; sensitivities are (output unit)/(input unit).
 * Sensitivity coefficients are central differences evaluated in 40-digit decimal arithmetic,
 * so models are never differentiated by hand.
 */
import { D, type Dec, type DecInput, toDec } from './decimal.ts';
import { CalcError } from './errors.ts';

/** The probability distribution a budget states for an input (used by the Monte Carlo propagation, monte-carlo.ts). */
export type InputDistribution = 'normal' | 'rectangular' | 'triangular';

export interface UncertainInput {
  value: DecInput;
  standardUncertainty: DecInput;
  label?: string;
  unit?: string;
  /** rectangular a/√3, triangular a/√6, or normal (a stated u or U/k); omitted: normal */
  distribution?: InputDistribution;
}

export interface BudgetRow {
  input: string;
  label: string;
  unit?: string;
  value: Dec;
  standardUncertainty: Dec;
  sensitivity: Dec;
  /** |c·u| in the output unit */
  contribution: Dec;
  /** (c·u)² / u_c², the fraction of the combined variance (0 when u_c = 0) */
  share: Dec;
}

export interface PropagationResult {
  value: Dec;
  standardUncertainty: Dec;
  budget: BudgetRow[];
}

export interface PropagateOptions {
  model: (x: Record<string, Dec>) => Dec;
  inputs: Record<string, UncertainInput>;
  /** [input a, input b, correlation coefficient r in −1..1] */
  correlations?: Array<[string, string, DecInput]>;
}

const STEP_REL_U = new D('1e-6');
const STEP_REL_X = new D('1e-9');
const STEP_ABS = new D('1e-12');

function evalModel(model: PropagateOptions['model'], x: Record<string, Dec>): Dec {
  const y = model(x);
  if (y && typeof y === 'object' && 'isFinite' in y && !y.isFinite()) {
    const at = Object.entries(x)
      .map(([k, v]) => `${k} = ${v.toString()}`)
      .join(', ');
    throw new CalcError('division_by_zero', `The model has no finite value at ${at} (division by zero); check the inputs that appear in a denominator`, {
      details: { inputs: Object.fromEntries(Object.entries(x).map(([k, v]) => [k, v.toString()])) },
    });
  }
  return toDec(y, 'model result');
}

/** Numerical step for input x with uncertainty u: a millionth of u, else a tiny fraction of x. */
function stepFor(x: Dec, u: Dec): Dec {
  if (u.gt(0)) return u.mul(STEP_REL_U);
  if (!x.isZero()) return x.abs().mul(STEP_REL_X);
  return STEP_ABS;
}

export function propagate(opts: PropagateOptions): PropagationResult {
  const names = Object.keys(opts.inputs);
  const x: Record<string, Dec> = {};
  const u: Record<string, Dec> = {};
  for (const n of names) {
    const inp = opts.inputs[n];
    x[n] = toDec(inp.value, `${n} value`);
    u[n] = toDec(inp.standardUncertainty, `${n} standard uncertainty`);
    if (u[n].isNeg()) {
      throw new CalcError('non_positive', `Standard uncertainty of ${n} must not be negative (got ${u[n].toString()})`, {
        details: { input: n },
      });
    }
  }
  const y = evalModel(opts.model, { ...x });
  const sens: Record<string, Dec> = {};
  for (const n of names) {
    const h = stepFor(x[n], u[n]);
    const yp = evalModel(opts.model, { ...x, [n]: x[n].plus(h) });
    const ym = evalModel(opts.model, { ...x, [n]: x[n].minus(h) });
    sens[n] = yp.minus(ym).div(h.mul(2));
  }
  let variance = new D(0);
  const cu: Record<string, Dec> = {};
  for (const n of names) {
    cu[n] = sens[n].mul(u[n]);
    variance = variance.plus(cu[n].pow(2));
  }
  for (const [a, b, rIn] of opts.correlations ?? []) {
    if (!(a in x) || !(b in x)) {
      throw new CalcError('missing_input', `Correlation refers to unknown input "${!(a in x) ? a : b}"; inputs are ${names.join(', ')}`, {
        details: { a, b },
      });
    }
    const r = toDec(rIn, `correlation ${a}/${b}`);
    if (r.lt(-1) || r.gt(1)) {
      throw new CalcError('calc_out_of_range', `Correlation coefficient ${r.toString()} between ${a} and ${b} is outside −1…1`, {
        details: { a, b },
      });
    }
    if (a === b) continue;
    variance = variance.plus(cu[a].mul(cu[b]).mul(r).mul(2));
  }
  if (variance.isNeg()) variance = new D(0);
  const uc = variance.sqrt();
  const budget: BudgetRow[] = names.map((n) => ({
    input: n,
    label: opts.inputs[n].label ?? n,
    ...(opts.inputs[n].unit !== undefined ? { unit: opts.inputs[n].unit } : {}),
    value: x[n],
    standardUncertainty: u[n],
    sensitivity: sens[n],
    contribution: cu[n].abs(),
    share: variance.isZero() ? new D(0) : cu[n].pow(2).div(variance),
  }));
  return { value: y, standardUncertainty: uc, budget };
}

/** Standard uncertainty of a rectangular distribution of half-width a: a/√3. */
export function rectangular(halfWidth: DecInput): Dec {
  const a = nonNegative(halfWidth, 'half-width');
  return a.div(new D(3).sqrt());
}

/** Standard uncertainty of a triangular distribution of half-width a: a/√6. */
export function triangular(halfWidth: DecInput): Dec {
  const a = nonNegative(halfWidth, 'half-width');
  return a.div(new D(6).sqrt());
}

/** u = U/k for a certificate's expanded uncertainty U with coverage factor k. */
export function fromExpanded(expandedUncertainty: DecInput, k: DecInput): Dec {
  const U = nonNegative(expandedUncertainty, 'expanded uncertainty');
  const kk = toDec(k, 'coverage factor k');
  if (kk.lte(0)) throw new CalcError('non_positive', `Coverage factor k must be greater than 0 (got ${kk.toString()})`);
  return U.div(kk);
}

/** U = k·u (default k = 2). */
export function expanded(standardUncertainty: DecInput, k: DecInput = '2'): Dec {
  const u = nonNegative(standardUncertainty, 'standard uncertainty');
  const kk = toDec(k, 'coverage factor k');
  if (kk.lte(0)) throw new CalcError('non_positive', `Coverage factor k must be greater than 0 (got ${kk.toString()})`);
  return u.mul(kk);
}

function nonNegative(x: DecInput, name: string): Dec {
  const d = toDec(x, name);
  if (d.isNeg()) throw new CalcError('non_positive', `The ${name} must not be negative (got ${d.toString()})`);
  return d;
}
