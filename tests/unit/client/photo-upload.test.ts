import { describe, expect, it } from 'vitest';
import { ApiError } from '../../../src/api/client';
import { formatBytes, type SendOnce, uploadWithRetry } from '../../../src/features/photos/upload';
import type { Photo } from '../../../src/shared/schemas/photos';

const photo = { id: 'p1' } as Photo;
const dropped = () => new ApiError(0, 'offline', 'The connection dropped while sending the photo');

/** A sender that fails with the given errors in turn, then succeeds; counts its calls. */
function scripted(...failures: unknown[]) {
  let calls = 0;
  const send: SendOnce = async () => {
    const failure = failures[calls];
    calls += 1;
    if (failure) throw failure;
    return photo;
  };
  return { send, calls: () => calls };
}

describe('uploadWithRetry', () => {
  const options = () => ({ onProgress: () => {}, signal: new AbortController().signal });

  it('tries a dropped connection once more and succeeds', async () => {
    const s = scripted(dropped());
    await expect(uploadWithRetry(s.send, options())).resolves.toBe(photo);
    expect(s.calls()).toBe(2);
  });

  it('gives up after the one retry', async () => {
    const s = scripted(dropped(), dropped(), dropped());
    await expect(uploadWithRetry(s.send, options())).rejects.toMatchObject({ status: 0 });
    expect(s.calls()).toBe(2);
  });

  it('never retries a refusal from the server', async () => {
    const s = scripted(new ApiError(415, 'unsupported_photo', 'not a photo'));
    await expect(uploadWithRetry(s.send, options())).rejects.toMatchObject({ status: 415 });
    expect(s.calls()).toBe(1);
  });

  it('never retries after a cancel', async () => {
    const controller = new AbortController();
    let calls = 0;
    const send: SendOnce = async () => {
      calls += 1;
      controller.abort();
      throw dropped();
    };
    await expect(uploadWithRetry(send, { onProgress: () => {}, signal: controller.signal })).rejects.toMatchObject({ status: 0 });
    expect(calls).toBe(1);
  });
});

describe('formatBytes', () => {
  it('writes kilobytes and megabytes', () => {
    expect(formatBytes(820 * 1024)).toBe('820 KB');
    expect(formatBytes(3.4 * 1024 * 1024)).toBe('3.4 MB');
    expect(formatBytes(10)).toBe('1 KB');
  });
});
