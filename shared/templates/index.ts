export * from './types.ts';
export * from './defaults.ts';
export * from './plan.ts';
