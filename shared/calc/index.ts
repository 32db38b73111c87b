/**
 * Public surface of the metrology core (decimal.js only; no I/O). Import from here outside shared/calc.
 */
export * from './decimal.ts';
export * from './errors.ts';
export * from './units.ts';
export * from './uncertainty.ts';
export * from './air-density.ts';
export * from './buoyancy.ts';
export * from './water-density.ts';
export * from './gravimetric-volume.ts';
export * from './molar-mass.ts';
export * from './rounding.ts';
export * from './min-weight.ts';
export * from './preparation.ts';
