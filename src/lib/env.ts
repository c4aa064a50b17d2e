/**
 * Where the API lives. Empty in production (the same server serves the app and /api);
 * the dev script sets EXPO_PUBLIC_API_URL to the API's own port.
 */
export const API_BASE_URL = (process.env.EXPO_PUBLIC_API_URL ?? '').replace(/\/$/, '');
