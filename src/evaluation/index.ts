export * from './evaluate.js';
export * from './conclude.js';
