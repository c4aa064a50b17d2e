import { useQueryClient } from '@tanstack/react-query';
import { useCallback, useEffect, useRef, useSyncExternalStore } from 'react';
import { ApiError } from '@/api/client';
import { postMeasurement, recordKeys } from '@/api/queries/records';
import { storage } from '@/lib/storage';
import type { MeasurementInput } from '@/shared/schemas/records';

const STORAGE_KEY = 'sympodia.outbox';
/** How often a waiting entry is tried again while the page is open. */
export const RETRY_INTERVAL_MS = 10_000;

export interface OutboxEntry {
  clientKey: string;
  collectionId: string;
  leadId: string;
  /** Shown to the grower beside a waiting or refused entry. */
  label: string;
  input: MeasurementInput;
  /** Set when the server refused the entry (a 4xx): it stays until the grower dismisses it. */
  refused?: string;
}

// The outbox lives in localStorage so a closed tab or a dropped connection loses nothing.
let entries: OutboxEntry[] = read();
const listeners = new Set<() => void>();

function read(): OutboxEntry[] {
  try {
    const parsed = JSON.parse(storage.get(STORAGE_KEY) ?? '[]');
    return Array.isArray(parsed) ? parsed : [];
  } catch {
    return [];
  }
}

function write(next: OutboxEntry[]) {
  entries = next;
  storage.set(STORAGE_KEY, JSON.stringify(next));
  for (const listener of listeners) listener();
}

export const outbox = {
  add(entry: OutboxEntry) {
    write([...entries.filter((e) => e.clientKey !== entry.clientKey), entry]);
  },
  dismiss(clientKey: string) {
    write(entries.filter((e) => e.clientKey !== clientKey));
  },
  entries: () => entries,
  subscribe(listener: () => void) {
    listeners.add(listener);
    return () => listeners.delete(listener);
  },
};

let flushing: Promise<number> | null = null;

/**
 * Sends waiting entries in order. Each carries its client key, so an entry whose answer
 * was lost in transit is stored once even when sent again. Stops at the first network
 * failure or server error (it will try again later); a refusal is kept, marked, for the
 * grower to see. Returns how many were stored.
 */
export function flushOutbox(): Promise<number> {
  if (flushing) return flushing;
  // The browser knows it is offline: wait for its 'online' event instead of failing sends.
  if (globalThis.navigator?.onLine === false) return Promise.resolve(0);
  // Cleared in a .finally callback, which always runs after this assignment; a finally
  // block inside the async function could run first (when nothing is waiting it finishes
  // synchronously) and leave a settled promise here for good.
  flushing = sendWaiting().finally(() => {
    flushing = null;
  });
  return flushing;
}

async function sendWaiting(): Promise<number> {
  let sent = 0;
  for (const entry of entries.filter((e) => !e.refused)) {
    try {
      await postMeasurement(entry.collectionId, entry.leadId, { ...entry.input, clientKey: entry.clientKey });
      write(entries.filter((e) => e.clientKey !== entry.clientKey));
      sent += 1;
    } catch (error) {
      if (error instanceof ApiError && error.status >= 400 && error.status < 500) {
        const reason = error.details.map((d) => d.reason).join('; ') || error.message;
        write(entries.map((e) => (e.clientKey === entry.clientKey ? { ...e, refused: reason } : e)));
        continue;
      }
      break;
    }
  }
  return sent;
}

/** The outbox's entries for one collection, sent whenever the browser is back online. */
export function useOutbox(collectionId: string) {
  const all = useSyncExternalStore(outbox.subscribe, outbox.entries, outbox.entries);
  const client = useQueryClient();
  const mounted = useRef(true);

  const flush = useCallback(async () => {
    const sent = await flushOutbox();
    if (sent > 0 && mounted.current) await client.invalidateQueries({ queryKey: recordKeys.all(collectionId) });
  }, [client, collectionId]);

  useEffect(() => {
    mounted.current = true;
    flush();
    const onOnline = () => flush();
    globalThis.addEventListener?.('online', onOnline);
    const timer = setInterval(flush, RETRY_INTERVAL_MS);
    return () => {
      mounted.current = false;
      globalThis.removeEventListener?.('online', onOnline);
      clearInterval(timer);
    };
  }, [flush]);

  const mine = all.filter((e) => e.collectionId === collectionId);
  return { waiting: mine.filter((e) => !e.refused), refused: mine.filter((e) => e.refused), flush };
}
