import { afterEach, describe, expect, it, vi } from 'vitest';
import { flushOutbox, outbox, type OutboxEntry } from '@/features/rounds/outbox';

const entry = (n: number): OutboxEntry => ({
  clientKey: `00000000-0000-4000-8000-00000000000${n}`,
  collectionId: '11111111-1111-4111-8111-111111111111',
  leadId: '22222222-2222-4222-8222-222222222222',
  label: `SH-00${n} 2026-A`,
  input: { date: '2026-06-01', heightMm: 40 + n, sheath: 'none' },
});

const stored = (clientKey: string) => ({
  id: '33333333-3333-4333-8333-333333333333',
  leadId: '22222222-2222-4222-8222-222222222222',
  date: '2026-06-01',
  heightMm: 41,
  leafCount: null,
  sheath: 'none',
  rootTips: null,
  bulbWidthMm: null,
  note: clientKey,
  createdBy: null,
  version: 1,
});

function respond(status: number, body: unknown) {
  return Promise.resolve(new Response(JSON.stringify(body), { status, headers: { 'Content-Type': 'application/json' } }));
}

afterEach(() => {
  for (const e of outbox.entries()) outbox.dismiss(e.clientKey);
  vi.unstubAllGlobals();
});

describe('the Rounds outbox', () => {
  it('keeps entries while the network is down and sends each once, with its client key, when it returns', async () => {
    const fetch = vi.fn().mockRejectedValue(new TypeError('Failed to fetch'));
    vi.stubGlobal('fetch', fetch);
    outbox.add(entry(1));
    outbox.add(entry(2));
    expect(await flushOutbox()).toBe(0);
    expect(outbox.entries()).toHaveLength(2);

    fetch.mockImplementation((_url: string, init: RequestInit) => respond(201, stored(JSON.parse(String(init.body)).clientKey)));
    expect(await flushOutbox()).toBe(2);
    expect(outbox.entries()).toHaveLength(0);
    const keys = fetch.mock.calls.slice(-2).map(([, init]) => JSON.parse(String((init as RequestInit).body)).clientKey);
    expect(keys).toEqual([entry(1).clientKey, entry(2).clientKey]);
  });

  it('flushes again after a flush that found nothing to send', async () => {
    const fetch = vi.fn((_url: string, init: RequestInit) => respond(201, stored(JSON.parse(String(init.body)).clientKey)));
    vi.stubGlobal('fetch', fetch);
    expect(await flushOutbox()).toBe(0);
    outbox.add(entry(3));
    expect(await flushOutbox()).toBe(1);
    expect(fetch).toHaveBeenCalledTimes(1);
  });

  it('marks a refused entry with the reason and goes on with the next', async () => {
    const fetch = vi
      .fn()
      .mockImplementationOnce(() => respond(400, { error: { code: 'invalid_input', message: 'Some fields need attention', details: [{ field: 'date', reason: 'The date is before the lead was first seen' }] } }))
      .mockImplementation((_url: string, init: RequestInit) => respond(201, stored(JSON.parse(String(init.body)).clientKey)));
    vi.stubGlobal('fetch', fetch);
    outbox.add(entry(4));
    outbox.add(entry(5));
    expect(await flushOutbox()).toBe(1);
    expect(outbox.entries()).toEqual([expect.objectContaining({ clientKey: entry(4).clientKey, refused: 'The date is before the lead was first seen' })]);
  });

  it('stops at a server error and keeps the rest for later', async () => {
    vi.stubGlobal('fetch', vi.fn(() => respond(503, { error: { code: 'database_unavailable', message: 'The database is not answering' } })));
    outbox.add(entry(6));
    outbox.add(entry(7));
    expect(await flushOutbox()).toBe(0);
    expect(outbox.entries().map((e) => e.refused)).toEqual([undefined, undefined]);
  });
});

describe('while the browser reports it is offline', () => {
  it('sends nothing and keeps every entry', async () => {
    const fetch = vi.fn();
    vi.stubGlobal('fetch', fetch);
    vi.stubGlobal('navigator', { onLine: false });
    outbox.add(entry(8));
    expect(await flushOutbox()).toBe(0);
    expect(fetch).not.toHaveBeenCalled();
    expect(outbox.entries()).toHaveLength(1);
  });
});
