/**
 * Sympodia's growth engine: pure functions over plain records (no I/O, no clock — `today` is
 * always a 'YYYY-MM-DD' parameter), usable on the server and the client.
 */
export * from './types';
export * from './dates';
export * from './distributions';
export * from './least-squares';
export * from './genus-defaults';
export * from './growth-curve';
export * from './prior-years';
export * from './flags';
export * from './degree-days';
export * from './bloom-stage';
export * from './bloom-timing';
export * from './bloom-window';
export * from './backtest';
export * from './compare';
export * from './attention';
export * from './cold-nights';
export * from './lead-forecast';
export * from './story';
export * from './entry-check';
