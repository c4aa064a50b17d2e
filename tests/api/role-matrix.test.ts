import { randomUUID } from 'node:crypto';
import fs from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { localDiskStore, type PhotoStore } from '../../server/photos/store';
import { insertPhoto } from '../factories/photos';
import { createApp } from '../../server/app';
import {
  buildAreaInput,
  buildBloomInput,
  buildCareInput,
  buildLeadInput,
  buildMeasurementInput,
  buildPlantInput,
  buildRecords,
  daysAgo,
} from '../factories/records';
import { insertInvitation } from '../factories/mail';
import { insertHandoff } from '../factories/handoffs';
import { buildCollectionWithMembers, buildSignUp } from '../factories/users';
import { testDb } from './support/database';
import { registeredRoutes } from './support/routes';
import { browser, startTestServer, type TestServer } from './support/server';

type Principal = 'anonymous' | 'outsider' | 'viewer' | 'grower' | 'owner';
type Expected = Record<Principal, number>;

const PUBLIC = (status: number): Expected => ({ anonymous: status, outsider: status, viewer: status, grower: status, owner: status });
const SIGNED_IN = (status: number): Expected => ({ anonymous: 401, outsider: status, viewer: status, grower: status, owner: status });
/** Collection routes: a non-member learns nothing (404); a member below the role gets 403. */
const MEMBERS = (minimum: 'viewer' | 'grower' | 'owner', status: number): Expected => {
  const allowed = (role: 'viewer' | 'grower' | 'owner') =>
    ({ viewer: 1, grower: 2, owner: 3 })[role] >= ({ viewer: 1, grower: 2, owner: 3 })[minimum] ? status : 403;
  return { anonymous: 401, outsider: 404, viewer: allowed('viewer'), grower: allowed('grower'), owner: allowed('owner') };
};

interface Entry {
  expected: Expected;
  body?: () => unknown;
  /** Appended to the path when the route needs a query to answer 200. */
  query?: string;
}

/**
 * Every /api route and who may use it. A route the server registers without an entry
 * here fails the first test, so access is decided for each new route.
 */
const MATRIX: Record<string, Entry> = {
  'GET /api/health': { expected: PUBLIC(200) },
  'GET /api/session': { expected: PUBLIC(200) },
  'POST /api/auth/sign-up': { expected: PUBLIC(202), body: () => buildSignUp() },
  // An unknown token: the link's own checks are in auth.test.ts.
  'POST /api/auth/sign-up/confirm': { expected: PUBLIC(400), body: () => ({ token: 'C'.repeat(43) }) },
  'POST /api/auth/sign-in': { expected: PUBLIC(401), body: () => ({ email: 'nobody@example.test', password: 'not-a-real-one' }) },
  'POST /api/auth/sign-out': { expected: SIGNED_IN(204) },
  'POST /api/auth/sign-out-everywhere': { expected: SIGNED_IN(204) },
  'POST /api/collections': { expected: SIGNED_IN(201), body: () => ({ name: 'Windowsill' }) },
  'GET /api/collections/:collectionId': { expected: MEMBERS('viewer', 200) },
  'PATCH /api/collections/:collectionId': { expected: MEMBERS('owner', 200), body: () => ({ name: 'Renamed bench' }) },
  'DELETE /api/collections/:collectionId': { expected: MEMBERS('owner', 204) },
  'GET /api/collections/:collectionId/members': { expected: MEMBERS('viewer', 200) },
  'PATCH /api/collections/:collectionId/members/:userId': { expected: MEMBERS('owner', 200), body: () => ({ role: 'viewer' }) },
  'DELETE /api/collections/:collectionId/members/:userId': { expected: MEMBERS('owner', 204) },
  'GET /api/collections/:collectionId/areas': { expected: MEMBERS('viewer', 200) },
  'POST /api/collections/:collectionId/areas': { expected: MEMBERS('grower', 201), body: () => buildAreaInput() },
  'PATCH /api/collections/:collectionId/areas/:areaId': { expected: MEMBERS('grower', 200), body: () => ({ version: 1, indoors: true }) },
  'DELETE /api/collections/:collectionId/areas/:areaId': { expected: MEMBERS('owner', 204) },
  'POST /api/collections/:collectionId/areas/:areaId/care': { expected: MEMBERS('grower', 201), body: () => buildCareInput() },
  'GET /api/collections/:collectionId/plants': { expected: MEMBERS('viewer', 200) },
  'POST /api/collections/:collectionId/plants': { expected: MEMBERS('grower', 201), body: () => buildPlantInput() },
  'GET /api/collections/:collectionId/plants/:plantId': { expected: MEMBERS('viewer', 200) },
  'PATCH /api/collections/:collectionId/plants/:plantId': { expected: MEMBERS('grower', 200), body: () => ({ version: 1, medium: 'sphagnum' }) },
  'DELETE /api/collections/:collectionId/plants/:plantId': { expected: MEMBERS('owner', 204) },
  'POST /api/collections/:collectionId/plants/:plantId/divide': {
    expected: MEMBERS('grower', 201),
    body: () => ({ dividedOn: daysAgo(1), pieces: [{ tag: 'Division A', bulbCount: 4 }] }),
  },
  'POST /api/collections/:collectionId/plants/:plantId/leads': { expected: MEMBERS('grower', 201), body: () => buildLeadInput() },
  'POST /api/collections/:collectionId/plants/:plantId/care': { expected: MEMBERS('grower', 201), body: () => buildCareInput() },
  'GET /api/collections/:collectionId/leads/:leadId': { expected: MEMBERS('viewer', 200) },
  'PATCH /api/collections/:collectionId/leads/:leadId': { expected: MEMBERS('grower', 200), body: () => ({ version: 1, status: 'mature' }) },
  'DELETE /api/collections/:collectionId/leads/:leadId': { expected: MEMBERS('owner', 204) },
  'POST /api/collections/:collectionId/leads/:leadId/measurements': { expected: MEMBERS('grower', 201), body: () => buildMeasurementInput() },
  'POST /api/collections/:collectionId/leads/:leadId/sheath': { expected: MEMBERS('grower', 201), body: () => ({ date: daysAgo(0), sheath: 'budded', heightMm: 55 }) },
  'PUT /api/collections/:collectionId/leads/:leadId/bloom': { expected: MEMBERS('grower', 201), body: () => buildBloomInput() },
  'PATCH /api/collections/:collectionId/measurements/:measurementId': { expected: MEMBERS('grower', 200), body: () => ({ version: 1, heightMm: 55 }) },
  /** The fixture's measurement and care entry were recorded by the grower, who may delete them. */
  'DELETE /api/collections/:collectionId/measurements/:measurementId': { expected: MEMBERS('grower', 204) },
  'DELETE /api/collections/:collectionId/care/:careId': { expected: MEMBERS('grower', 204) },
  'GET /api/collections/:collectionId/rounds': { expected: MEMBERS('viewer', 200) },
  'PUT /api/collections/:collectionId/rounds/order': { expected: MEMBERS('grower', 200), body: () => ({ plantIds: [] }) },
  // Growth engine: read-only, so any member may ask.
  'GET /api/collections/:collectionId/leads/:leadId/forecast': { expected: MEMBERS('viewer', 200) },
  'GET /api/collections/:collectionId/plants/:plantId/trend': { expected: MEMBERS('viewer', 200) },
  'GET /api/collections/:collectionId/attention': { expected: MEMBERS('viewer', 200) },
  'GET /api/collections/:collectionId/calendar': { expected: MEMBERS('viewer', 200) },
  'GET /api/collections/:collectionId/backtest': { expected: MEMBERS('viewer', 200) },
  'GET /api/collections/:collectionId/lead-stories': { expected: MEMBERS('viewer', 200) },
  'GET /api/collections/:collectionId/compare': { expected: MEMBERS('viewer', 200), query: '?by=medium' },
  // Mail: invitations are the owners' business; the link itself is the credential for the invitee.
  'GET /api/collections/:collectionId/invitations': { expected: MEMBERS('owner', 200) },
  'POST /api/collections/:collectionId/invitations': { expected: MEMBERS('owner', 201), body: () => ({ email: 'new-partner@example.test', role: 'grower' }) },
  'DELETE /api/collections/:collectionId/invitations/:invitationId': { expected: MEMBERS('owner', 204) },
  'GET /api/invitations/:token': { expected: PUBLIC(200) },
  'POST /api/invitations/:token/accept': { expected: SIGNED_IN(200) },
  'POST /api/auth/password-reset': { expected: PUBLIC(202), body: () => ({ email: 'nobody@example.test' }) },
  /** An unknown token: refused the same for everyone, signed in or not. */
  'POST /api/auth/password-reset/complete': { expected: PUBLIC(400), body: () => ({ token: 'C'.repeat(43), password: 'pseudobulb-ladder-77' }) },
  'GET /api/collections/:collectionId/digest': { expected: MEMBERS('viewer', 200) },
  'PUT /api/collections/:collectionId/digest': { expected: MEMBERS('viewer', 200), body: () => ({ optedOut: true }) },
  'GET /api/collections/:collectionId/cold-nights': { expected: MEMBERS('viewer', 200) },
  // Photos: members see them; growers add them (a JSON body carries no file: 400 once past the guard).
  'POST /api/collections/:collectionId/photos': { expected: MEMBERS('grower', 400), body: () => ({}) },
  'GET /api/collections/:collectionId/photos': { expected: MEMBERS('viewer', 200), query: '?leadId=:leadId' },
  'GET /api/collections/:collectionId/photos/:photoId/:size': { expected: MEMBERS('viewer', 200) },
  /** The fixture's photo was added by the grower, who may delete it. */
  'DELETE /api/collections/:collectionId/photos/:photoId': { expected: MEMBERS('grower', 204) },
  /** A fresh key per request: cancelling an upload that has not arrived. */
  'DELETE /api/collections/:collectionId/photo-uploads/:clientKey': { expected: MEMBERS('grower', 200) },
  // Import: growers and owners bring in spreadsheets; a JSON body is not a CSV file (415 once past the guard).
  'POST /api/collections/:collectionId/imports/mapping': { expected: MEMBERS('grower', 200), body: () => ({ headers: ['Tag', 'Lead'] }) },
  'POST /api/collections/:collectionId/imports/check': { expected: MEMBERS('grower', 415), body: () => ({}) },
  'POST /api/collections/:collectionId/imports': { expected: MEMBERS('grower', 415), body: () => ({}) },
  // Export: any member may take a copy; restore is the owner's, and the fixture's collection already has records (409).
  'GET /api/collections/:collectionId/export.zip': { expected: MEMBERS('viewer', 200) },
  'GET /api/collections/:collectionId/export.json': { expected: MEMBERS('viewer', 200) },
  'POST /api/collections/:collectionId/restore': {
    expected: MEMBERS('owner', 409),
    body: () => ({
      format: 'sympodia-export',
      version: 1,
      exportedAt: new Date().toISOString(),
      collection: { name: 'Backup', seasonStartMonth: 3, units: 'mm' },
      areas: [],
      plants: [{ id: 'p1', tag: 'R-1', genus: 'C.', epithet: 'Quiet Meadow' }],
      leads: [],
      measurements: [],
      bloomRecords: [],
      careEntries: [],
    }),
  },
  // Division hand-offs: growers send and list them; the fixture's was sent by the grower, who may withdraw it.
  'GET /api/collections/:collectionId/handoffs': { expected: MEMBERS('grower', 200) },
  'GET /api/collections/:collectionId/plants/:plantId/handoffs': { expected: MEMBERS('grower', 200) },
  'POST /api/collections/:collectionId/plants/:plantId/handoffs': { expected: MEMBERS('grower', 201), body: () => ({ email: 'new-keeper@example.test' }) },
  'DELETE /api/collections/:collectionId/handoffs/:handoffId': { expected: MEMBERS('grower', 204) },
  /** The link shows its offer to anyone; only the recipient (the fixture's is sent to the outsider) may accept. */
  'GET /api/handoffs/:token': { expected: PUBLIC(200) },
  'POST /api/handoffs/:token/accept': {
    expected: { anonymous: 401, outsider: 200, viewer: 403, grower: 403, owner: 403 },
    body: () => ({ newCollectionName: 'Received divisions' }),
  },
};

const PRINCIPALS: Principal[] = ['anonymous', 'outsider', 'viewer', 'grower', 'owner'];

let server: TestServer;
let photoDir: string;
let photoStore: PhotoStore;
beforeAll(async () => {
  photoDir = await fs.mkdtemp(path.join(os.tmpdir(), 'sympodia-matrix-photos-'));
  photoStore = localDiskStore(photoDir);
  server = await startTestServer({ photoStore });
});
afterAll(async () => {
  await server.close();
  await fs.rm(photoDir, { recursive: true, force: true });
});

describe('role matrix', () => {
  it('has an entry for every registered /api route, and no entry for a route that does not exist', () => {
    const routes = registeredRoutes(createApp({ db: testDb() })).filter((r) => r.split(' ')[1].startsWith('/api/'));
    expect(routes.length).toBeGreaterThan(5);
    expect(routes).toEqual(Object.keys(MATRIX).sort());
  });

  const cases = Object.entries(MATRIX).flatMap(([route, entry]) =>
    PRINCIPALS.map((principal) => ({ route, principal, entry, status: entry.expected[principal] })),
  );

  it.each(cases)('$route as $principal → $status', async ({ route, principal, entry, status }) => {
    // A fresh collection for every case, so deletions cannot leak into the next one.
    const fixture = await buildCollectionWithMembers(testDb());
    const records = await buildRecords(testDb(), fixture.collectionId, fixture.people.grower.id);
    const invitation = await insertInvitation(testDb(), fixture.collectionId, fixture.people.owner.id);
    const photo = await insertPhoto(testDb(), photoStore, { collectionId: fixture.collectionId, userId: fixture.people.grower.id, role: 'grower' }, records.lead.id);
    const handoff = await insertHandoff(testDb(), {
      collectionId: fixture.collectionId,
      plantId: records.plant.id,
      sentBy: fixture.people.grower.id,
      recipientEmail: fixture.people.outsider.email,
    });
    const [method, template] = route.split(' ');
    const path = template
      .replace(':collectionId', fixture.collectionId)
      .replace(':userId', fixture.people.grower.id)
      .replace(':areaId', records.area.id)
      .replace(':plantId', records.plant.id)
      .replace(':leadId', records.lead.id)
      .replace(':measurementId', records.measurement.id)
      .replace(':careId', records.care.id)
      .replace(':invitationId', invitation.id)
      .replace(':handoffId', handoff.id)
      .replace(':token', template.includes('/handoffs/') ? handoff.token : invitation.token)
      .replace(':photoId', photo.id)
      .replace(':clientKey', randomUUID())
      .replace(':size', 'thumb') + (entry.query ?? '').replace(':leadId', records.lead.id);
    const cookie = principal === 'anonymous' ? undefined : fixture.people[principal].cookie;
    const res = await browser(server.url, cookie).send(method.toLowerCase() as 'get', path, entry.body?.());
    expect(res.status, JSON.stringify(res.body)).toBe(status);
    if (status >= 400) expect(res.body.error.code).toEqual(expect.any(String));
  });
});
