import { describe, expect, it } from 'vitest';
import { FingerprintMemo } from '../../../server/services/engine-data';

function setup(ttlMs = 1000) {
  let clock = 0;
  let value = 'v1';
  const reads: string[] = [];
  let release: (() => void) | null = null;
  let hold = false;
  const memo = new FingerprintMemo(
    async (id) => {
      reads.push(id);
      const answer = value;
      if (hold) await new Promise<void>((resolve) => (release = resolve));
      return answer;
    },
    ttlMs,
    () => clock,
  );
  return {
    memo,
    reads,
    tick: (ms: number) => (clock += ms),
    set: (v: string) => (value = v),
    holdNextRead: () => (hold = true),
    releaseRead: () => {
      hold = false;
      release?.();
    },
  };
}

describe('FingerprintMemo', () => {
  it('asks the database once per TTL', async () => {
    const t = setup();
    expect(await t.memo.get('c1')).toBe('v1');
    t.set('v2');
    t.tick(999);
    expect(await t.memo.get('c1')).toBe('v1');
    t.tick(1);
    expect(await t.memo.get('c1')).toBe('v2');
    expect(t.reads).toEqual(['c1', 'c1']);
  });

  it('reads again in the background past half the TTL, so callers never wait on a busy collection', async () => {
    const t = setup();
    expect(await t.memo.get('c1')).toBe('v1');
    t.set('v2');
    t.tick(400);
    expect(await t.memo.get('c1')).toBe('v1');
    expect(t.reads).toEqual(['c1']);
    t.tick(200); // 600 ms old: answered at once from memory, and a read starts behind it
    t.holdNextRead();
    expect(await t.memo.get('c1')).toBe('v1');
    expect(t.reads).toEqual(['c1', 'c1']);
    expect(await t.memo.get('c1')).toBe('v1'); // the read in flight is shared, not repeated
    expect(t.reads).toEqual(['c1', 'c1']);
    t.releaseRead();
    await new Promise((resolve) => setTimeout(resolve, 0));
    expect(await t.memo.get('c1')).toBe('v2');
    // That read began at 600 ms and is dated so: at 1,600 ms it is too old to trust, and the
    // caller waits for a fresh one.
    t.tick(1000);
    t.set('v3');
    expect(await t.memo.get('c1')).toBe('v3');
    expect(t.reads).toEqual(['c1', 'c1', 'c1']);
  });

  it('a write through this process is seen at once', async () => {
    const t = setup();
    await t.memo.get('c1');
    t.set('v2');
    t.memo.forget('c1');
    expect(await t.memo.get('c1')).toBe('v2');
  });

  it('keeps collections apart', async () => {
    const t = setup();
    await t.memo.get('c1');
    t.memo.forget('c2');
    await t.memo.get('c1');
    expect(t.reads).toEqual(['c1']);
  });

  it('does not store a read that was in flight when the collection was forgotten', async () => {
    const t = setup();
    t.holdNextRead();
    const stale = t.memo.get('c1'); // reads 'v1', then a write lands before it returns
    t.set('v2');
    t.memo.forget('c1');
    t.releaseRead();
    expect(await stale).toBe('v1');
    expect(await t.memo.get('c1')).toBe('v2');
  });
});
