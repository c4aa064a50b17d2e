import { createContext, useCallback, useContext, useEffect, useMemo, useState, type ReactNode } from 'react';
import { CURRENT_COLLECTION_COOKIE } from '@/shared/boot';
import type { CollectionSummary } from '@/shared/schemas/auth';
import { collectionFromPage } from '@/api/page-data';
import { rememberInCookie } from '@/lib/cookie';
import { storage } from '@/lib/storage';

const STORAGE_KEY = 'sympodia.currentCollection';

interface CurrentCollection {
  collection: CollectionSummary | undefined;
  collections: CollectionSummary[];
  select: (id: string) => void;
}

/** Makes `id` the collection this browser opens next (after accepting an invitation, say). */
export function rememberCollection(id: string): void {
  storage.set(STORAGE_KEY, id);
  rememberInCookie(CURRENT_COLLECTION_COOKIE, id);
}

const Context = createContext<CurrentCollection | null>(null);

/** Remembers which of the person's collections they are working in (per browser). */
export function CurrentCollectionProvider({ collections, children }: { collections: CollectionSummary[]; children: ReactNode }) {
  // The page's collection first: the server drew the page in it (from the cookie that mirrors
  // this choice), and the browser's first draw must match.
  const [chosen, setChosen] = useState<string | null>(() => collectionFromPage() ?? storage.get(STORAGE_KEY));
  const select = useCallback((id: string) => {
    rememberCollection(id);
    setChosen(id);
  }, []);
  const value = useMemo(
    () => ({ collection: collections.find((c) => c.id === chosen) ?? collections[0], collections, select }),
    [collections, chosen, select],
  );
  // The same choice in a cookie, so the server draws the next page in this collection (a choice
  // made before the cookie existed reaches it from the next page on).
  const openedId = value.collection?.id;
  useEffect(() => {
    if (openedId) rememberInCookie(CURRENT_COLLECTION_COOKIE, openedId);
  }, [openedId]);
  return <Context.Provider value={value}>{children}</Context.Provider>;
}

export function useCurrentCollection(): CurrentCollection {
  const value = useContext(Context);
  if (!value) throw new Error('useCurrentCollection must be used inside CurrentCollectionProvider');
  return value;
}
