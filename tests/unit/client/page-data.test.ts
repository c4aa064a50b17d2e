import { afterEach, describe, expect, it } from 'vitest';
import { z } from 'zod';
import { collectionFromPage, meFromPage, responseFromPage, todayFromPage } from '@/api/page-data';
import { PAGE_DATA_GLOBAL } from '@/shared/boot';

const holder = globalThis as Record<string, unknown>;
const me = { user: { id: 'u1', email: 'a@b.test', displayName: 'Ann' }, collections: [{ id: '8848a0f4-4519-4105-8a3e-c36b3c5b6a0f', name: 'Bench', role: 'owner' }] };

describe('page data during a server render', () => {
  afterEach(() => {
    delete holder[PAGE_DATA_GLOBAL];
  });

  it('reads who is signed in, the collection, the date and the answers the page server handed over', () => {
    holder[PAGE_DATA_GLOBAL] = { me, collectionId: 'c1', today: '2026-12-02', responses: { '/collections/c1/attention': { items: [] } } };
    expect(meFromPage()).toEqual(me);
    expect(collectionFromPage()).toBe('c1');
    expect(todayFromPage()).toBe('2026-12-02');
    expect(responseFromPage('/collections/c1/attention', z.object({ items: z.array(z.unknown()) }))).toEqual({ items: [] });
    // Every render of the same page reads the same answer (nothing is taken away on the server).
    expect(responseFromPage('/collections/c1/attention', z.object({ items: z.array(z.unknown()) }))).toEqual({ items: [] });
  });

  it("gives nothing for an answer the page lacks or that fails the query's schema", () => {
    holder[PAGE_DATA_GLOBAL] = { me: null, responses: { '/x': { items: 'not a list' } } };
    expect(meFromPage()).toBeNull();
    expect(responseFromPage('/x', z.object({ items: z.array(z.unknown()) }))).toBeUndefined();
    expect(responseFromPage('/y', z.object({}))).toBeUndefined();
  });

  it('says nothing when what was handed over is not page data', () => {
    holder[PAGE_DATA_GLOBAL] = { me: { user: 'nobody' } };
    expect(meFromPage()).toBeUndefined();
    expect(collectionFromPage()).toBeUndefined();
  });
});
