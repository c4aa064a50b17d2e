import { afterEach, describe, expect, it, vi } from 'vitest';
import { z } from 'zod';
import { collectionFromPage, meFromPage, responseFromPage, todayFromPage } from '@/api/page-data';
import { BOOT_ELEMENT_ID, PAGE_DATA_GLOBAL } from '@/shared/boot';

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

describe('page data in the browser', () => {
  const collectionId = '8848a0f4-4519-4105-8a3e-c36b3c5b6a0f';
  let removed = 0;

  /** The page module afresh, over a stand-in document holding `text` in the page's element. */
  async function pageWith(text: string) {
    vi.resetModules();
    removed = 0;
    const element = { textContent: text, remove: () => (removed += 1) };
    vi.stubGlobal('document', { getElementById: (id: string) => (id === BOOT_ELEMENT_ID ? element : null) });
    return import('@/api/page-data');
  }

  afterEach(() => {
    vi.unstubAllGlobals();
  });

  it('reads the element once and takes it out of the page', async () => {
    const page = await pageWith(JSON.stringify({ me, collectionId, today: '2026-12-02', wide: true, answeredAt: 1, responses: {} }));
    expect(page.meFromPage()).toEqual(me);
    expect(page.todayFromPage()).toBe('2026-12-02');
    expect(page.wideFromPage()).toBe(true);
    expect(page.answeredAtFromPage()).toBe(1);
    expect(removed).toBe(1);
  });

  it('gives an answer and the collection once: a later screen or sign-in asks for itself', async () => {
    const schema = z.object({ items: z.array(z.unknown()) });
    const page = await pageWith(JSON.stringify({ me, collectionId, responses: { '/a': { items: [] }, '/b': { items: [1] } } }));
    expect(page.responseFromPage('/a', schema)).toEqual({ items: [] });
    expect(page.responseFromPage('/a', schema)).toBeUndefined();
    expect(page.collectionFromPage()).toBe(collectionId);
    expect(page.collectionFromPage()).toBeUndefined();
    // After a write, answers no screen has taken are dropped too.
    page.forgetPageAnswers();
    expect(page.responseFromPage('/b', schema)).toBeUndefined();
    // Who is signed in stays: the session query took it at the start.
    expect(page.meFromPage()).toEqual(me);
  });

  it('says nothing when the element is not readable page data', async () => {
    const page = await pageWith('{ not json');
    expect(page.meFromPage()).toBeUndefined();
    expect(page.responseFromPage('/a', z.object({}))).toBeUndefined();
  });
});
