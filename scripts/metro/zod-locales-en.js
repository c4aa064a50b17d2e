// Stands in for zod's `locales/index.js` in the web bundle (see metro.config.js): the app
// speaks English only and never calls z.config(z.locales.xx()), so only `en` is kept.
export { default as en } from 'zod/v4/locales/en.js';
