import { randomUUID } from 'node:crypto';
import type { PhotoStore } from '../../../server/photos/store';
import { insertInvitation } from '../../factories/mail';
import { insertPhoto } from '../../factories/photos';
import {
  buildAreaInput,
  buildBloomInput,
  buildCareInput,
  buildLeadInput,
  buildMeasurementInput,
  buildPlantInput,
  buildRecords,
  daysAgo,
} from '../../factories/records';
import { buildCollectionWithMembers, buildSignUp } from '../../factories/users';
import { testDb } from './database';

/** A seeded collection with one record of every kind, and the owner's session cookie. */
export async function hostileWorld(photoStore: PhotoStore) {
  const fixture = await buildCollectionWithMembers(testDb(), 'Hostile bench');
  const records = await buildRecords(testDb(), fixture.collectionId, fixture.people.grower.id);
  const invitation = await insertInvitation(testDb(), fixture.collectionId, fixture.people.owner.id);
  const photo = await insertPhoto(testDb(), photoStore, { collectionId: fixture.collectionId, userId: fixture.people.grower.id, role: 'grower' }, records.lead.id);
  /** Path parameter values that name real things of the collection. */
  const params: Record<string, string> = {
    collectionId: fixture.collectionId,
    userId: fixture.people.grower.id,
    areaId: records.area.id,
    plantId: records.plant.id,
    leadId: records.lead.id,
    measurementId: records.measurement.id,
    careId: records.care.id,
    invitationId: invitation.id,
    photoId: photo.id,
    size: 'thumb',
    token: invitation.token,
    key: 'Unknown-digest-key-0000',
  };
  return { ...fixture, records, invitation, photo, params, cookie: fixture.people.owner.cookie };
}

export type HostileWorld = Awaited<ReturnType<typeof hostileWorld>>;

/** A value for a path parameter this file does not know: a well-formed id of nothing. */
export const unknownParam = () => randomUUID();

/**
 * Bodies that pass validation, per route. Hostile requests start from one and break it;
 * a write route missing here still gets generic hostile bodies (the test lists it).
 */
export function validBodies(world: HostileWorld): Record<string, () => Record<string, unknown>> {
  return {
    'POST /api/auth/sign-up': () => buildSignUp(),
    'POST /api/auth/sign-up/confirm': () => ({ token: 'C'.repeat(43) }),
    'POST /api/auth/sign-in': () => ({ email: 'nobody@example.test', password: 'not-a-real-one' }),
    'POST /api/auth/password-reset': () => ({ email: 'nobody@example.test' }),
    'POST /api/auth/password-reset/complete': () => ({ token: 'C'.repeat(43), password: 'pseudobulb-ladder-77' }),
    'POST /api/collections': () => ({ name: 'Windowsill' }),
    'PATCH /api/collections/:collectionId': () => ({ name: 'Renamed bench' }),
    'PATCH /api/collections/:collectionId/members/:userId': () => ({ role: 'viewer' }),
    'POST /api/collections/:collectionId/areas': () => buildAreaInput({ notes: 'North window' }),
    'PATCH /api/collections/:collectionId/areas/:areaId': () => ({ version: 1, indoors: true, name: 'Renamed' }),
    'POST /api/collections/:collectionId/areas/:areaId/care': () => buildCareInput(),
    'POST /api/collections/:collectionId/plants': () => buildPlantInput({ areaId: world.records.area.id, notes: 'From a friend' }),
    'PATCH /api/collections/:collectionId/plants/:plantId': () => ({ version: 1, medium: 'sphagnum', acquiredOn: daysAgo(30) }),
    'POST /api/collections/:collectionId/plants/:plantId/divide': () => ({ dividedOn: daysAgo(1), pieces: [{ tag: 'Division A', bulbCount: 4 }] }),
    'POST /api/collections/:collectionId/plants/:plantId/leads': () => buildLeadInput(),
    'POST /api/collections/:collectionId/plants/:plantId/care': () => buildCareInput(),
    'PATCH /api/collections/:collectionId/leads/:leadId': () => ({ version: 1, status: 'mature' }),
    'POST /api/collections/:collectionId/leads/:leadId/measurements': () => buildMeasurementInput(),
    'POST /api/collections/:collectionId/leads/:leadId/sheath': () => ({ date: daysAgo(0), sheath: 'budded', heightMm: 55 }),
    'PUT /api/collections/:collectionId/leads/:leadId/bloom': () => buildBloomInput(),
    'PATCH /api/collections/:collectionId/measurements/:measurementId': () => ({ version: 1, heightMm: 55 }),
    'PUT /api/collections/:collectionId/rounds/order': () => ({ plantIds: [world.records.plant.id] }),
    'POST /api/collections/:collectionId/invitations': () => ({ email: 'new-partner@example.test', role: 'grower' }),
    'PUT /api/collections/:collectionId/digest': () => ({ optedOut: true }),
    'POST /api/collections/:collectionId/plants/:plantId/handoffs': () => ({ email: 'friend@example.test', note: 'A division from the north bench' }),
    // The token in the path is an invitation's, never a hand-off's: only the body can be at fault first.
    'POST /api/handoffs/:token/accept': () => ({ newCollectionName: 'From a friend' }),
  };
}

/**
 * Write routes that read no body (or must never be sent a valid one here, because it would
 * act: sign out, accept, delete). They get malformed bodies and hostile path parameters.
 */
export const BODYLESS = new Set([
  'POST /api/auth/sign-out',
  'POST /api/auth/sign-out-everywhere',
  'POST /api/invitations/:token/accept',
  'POST /digest/unsubscribe/:key',
]);

/** The multipart upload: hostile non-multipart bodies and bad multipart parts instead of JSON. */
export const PHOTO_ROUTE = 'POST /api/collections/:collectionId/photos';
