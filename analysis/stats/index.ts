// The stats families: pure numeric functions, no database and no prose.
export * from './summary.js';
export * from './welch.js';
export * from './proportions.js';
export * from './bootstrap.js';
export * from './mann-kendall.js';
export * from './decomposition.js';
export * from './growth.js';
export * from './decades.js';
export * from './concentration.js';
export * from './outliers.js';
export { median, quantileSorted } from './order-stats.js';
export { mulberry32 } from './random.js';
export * from './log-shift.js';
