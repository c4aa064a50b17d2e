// Stands in for zod's ahead-of-time compiler (core/compile.js) in the web bundle (see
// metro.config.js): the app runs zod jitless under its CSP and never compiles a schema.
// The sentinel is the same global symbol the real module uses.
export const INVALID = Symbol.for('zod.compile.invalid');
export class ZodCompileAsyncError extends Error {}
export class ZodCompileUnsupportedError extends Error {}
const unavailable = () => {
  throw new Error("zod's compile() is left out of Sympodia's web bundle (see metro.config.js)");
};
export const compile = unavailable;
export const compileFn = unavailable;
export const withParser = unavailable;
