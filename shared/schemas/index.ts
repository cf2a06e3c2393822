export * from './common.ts';
export * from './session.ts';
export * from './jobs.ts';
export * from './bookings.ts';
export * from './placement.ts';
