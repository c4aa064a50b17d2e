/**
 * The browser tests' server port, database and web build. The defaults are what `npm test`
 * uses; a second checkout running its own browser tests at the same time can move all three.
 */
export const E2E_PORT = Number(process.env.E2E_PORT ?? 8791);
export const E2E_DATABASE = process.env.E2E_DATABASE ?? 'sympodia_e2e';
export const E2E_WEB_ROOT = process.env.E2E_WEB_ROOT ?? 'dist';
