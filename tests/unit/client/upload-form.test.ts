import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { z } from 'zod';
import { uploadForm } from '../../../src/api/upload';

/** Just enough of XMLHttpRequest for uploadForm: the test answers each request by hand. */
class FakeXhr {
  static last: FakeXhr | null = null;
  method = '';
  url = '';
  withCredentials = false;
  status = 0;
  responseText = '';
  sent: unknown = null;
  aborted = false;
  upload: { onprogress: ((e: { loaded: number; total: number; lengthComputable: boolean }) => void) | null } = { onprogress: null };
  onload: (() => void) | null = null;
  onerror: (() => void) | null = null;
  onabort: (() => void) | null = null;
  constructor() {
    FakeXhr.last = this;
  }
  open(method: string, url: string) {
    this.method = method;
    this.url = url;
  }
  send(body: unknown) {
    this.sent = body;
  }
  abort() {
    this.aborted = true;
    this.onabort?.();
  }
  answer(status: number, body: unknown) {
    this.status = status;
    this.responseText = typeof body === 'string' ? body : JSON.stringify(body);
    this.onload?.();
  }
}

const schema = z.object({ id: z.string() });
const options = { schema, droppedMessage: 'The connection dropped' };
const refusal = { error: { code: 'photo_too_large', message: 'Some fields need attention', details: [{ field: 'photo', reason: 'The file is larger than 20 MB' }] } };

let original: unknown;
beforeEach(() => {
  original = (globalThis as { XMLHttpRequest?: unknown }).XMLHttpRequest;
  (globalThis as { XMLHttpRequest?: unknown }).XMLHttpRequest = FakeXhr;
  FakeXhr.last = null;
});
afterEach(() => {
  (globalThis as { XMLHttpRequest?: unknown }).XMLHttpRequest = original;
});

describe('uploadForm', () => {
  it('posts the form with credentials and resolves with any 2xx answer read through the schema', async () => {
    const form = new FormData();
    const progress: number[] = [];
    const sending = uploadForm('/collections/c1/photos', form, { ...options, onProgress: (p) => progress.push(p.loaded) });
    const xhr = FakeXhr.last!;
    expect([xhr.method, xhr.url.endsWith('/api/collections/c1/photos'), xhr.withCredentials, xhr.sent]).toEqual(['POST', true, true, form]);
    xhr.upload.onprogress?.({ loaded: 5, total: 10, lengthComputable: true });
    xhr.answer(200, { id: 'p1' });
    await expect(sending).resolves.toEqual({ id: 'p1' });
    expect(progress).toEqual([5]);
  });

  it('rejects an answer that does not match the schema', async () => {
    const sending = uploadForm('/x', new FormData(), options);
    FakeXhr.last!.answer(201, { nothing: true });
    await expect(sending).rejects.toMatchObject({ status: 201, code: 'unexpected' });
  });

  it('gives the general message of a refusal, or its first field reason when asked', async () => {
    const general = uploadForm('/x', new FormData(), options);
    FakeXhr.last!.answer(413, refusal);
    await expect(general).rejects.toMatchObject({ status: 413, code: 'photo_too_large', message: 'Some fields need attention' });
    const field = uploadForm('/x', new FormData(), { ...options, fieldReasonFirst: true });
    FakeXhr.last!.answer(413, refusal);
    await expect(field).rejects.toMatchObject({ message: 'The file is larger than 20 MB', details: refusal.error.details });
  });

  it('names a status it cannot read, and a dropped connection as status 0', async () => {
    const garbled = uploadForm('/x', new FormData(), options);
    FakeXhr.last!.answer(502, '<html>bad gateway</html>');
    await expect(garbled).rejects.toMatchObject({ status: 502, message: 'The server answered 502' });
    const dropped = uploadForm('/x', new FormData(), options);
    FakeXhr.last!.onerror?.();
    await expect(dropped).rejects.toMatchObject({ status: 0, code: 'offline', message: 'The connection dropped' });
  });

  it('is cancelled by its signal, before sending or on the way', async () => {
    const before = new AbortController();
    before.abort();
    await expect(uploadForm('/x', new FormData(), { ...options, signal: before.signal })).rejects.toMatchObject({ name: 'AbortError' });
    expect(FakeXhr.last).toBeNull();
    const during = new AbortController();
    const sending = uploadForm('/x', new FormData(), { ...options, signal: during.signal });
    during.abort();
    await expect(sending).rejects.toMatchObject({ name: 'AbortError' });
    expect(FakeXhr.last!.aborted).toBe(true);
  });
});
