export * from './problem.js';
export * from './format.js';
