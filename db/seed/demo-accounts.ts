import type { Role } from '@/shared/schemas/auth';

/** The invented demo collection's people; their password is printed on start and in the README. */
export const DEMO_PASSWORD = 'sheath-and-spike-26';

export const DEMO_COLLECTION_NAME = 'Saltmarsh Lane shade house';

export const DEMO_ACCOUNTS: ReadonlyArray<{ email: string; displayName: string; role: Role }> = [
  { email: 'owner@demo.test', displayName: 'Wren Halloway', role: 'owner' },
  { email: 'grower@demo.test', displayName: 'Tomas Okafor', role: 'grower' },
  { email: 'viewer@demo.test', displayName: 'Priya Lindqvist', role: 'viewer' },
];

/** The demo collection's location for the night forecast (invented; decimal degrees). */
export const DEMO_LOCATION = { latitude: 26.1, longitude: -80.3 } as const;
