/** Planning and recording helpers for prepared standards (pure, no I/O). */
export * from './dates.ts';
export * from './reading.ts';
export * from './identifiers.ts';
export * from './expiry.ts';
export * from './volume.ts';
export * from './gates.ts';
export * from './calibrated-volume.ts';
