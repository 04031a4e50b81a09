/**
 * tolrate's library API. Rates are fractions (0.06 = 6%).
 * The statistical engine is pure; the rest reads and writes workpaper files.
 */
export * from './stats/index.js';
export * from './errors.js';
export * as workpaper from './workpaper/index.js';
export * as evaluation from './control-test/index.js';
