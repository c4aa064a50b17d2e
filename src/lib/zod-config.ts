import { z } from 'zod';

/**
 * zod compiles fast object parsers with `new Function` after probing whether eval is allowed.
 * The app's Content-Security-Policy forbids eval, so the probe itself is reported as a
 * violation: tell zod not to try. Imported first by app/_layout.tsx, before any parse.
 */
z.config({ jitless: true });
