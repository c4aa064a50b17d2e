import { createContext, useCallback, useContext, useMemo, useState, type ReactNode } from 'react';
import type { CollectionSummary } from '@/shared/schemas/auth';
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
}

const Context = createContext<CurrentCollection | null>(null);

/** Remembers which of the person's collections they are working in (per browser). */
export function CurrentCollectionProvider({ collections, children }: { collections: CollectionSummary[]; children: ReactNode }) {
  const [chosen, setChosen] = useState<string | null>(() => storage.get(STORAGE_KEY));
  const select = useCallback((id: string) => {
    storage.set(STORAGE_KEY, id);
    setChosen(id);
  }, []);
  const value = useMemo(
    () => ({ collection: collections.find((c) => c.id === chosen) ?? collections[0], collections, select }),
    [collections, chosen, select],
  );
  return <Context.Provider value={value}>{children}</Context.Provider>;
}

export function useCurrentCollection(): CurrentCollection {
  const value = useContext(Context);
  if (!value) throw new Error('useCurrentCollection must be used inside CurrentCollectionProvider');
  return value;
}
