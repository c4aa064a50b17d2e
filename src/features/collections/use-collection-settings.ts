import { useCollectionQuery } from '@/api/queries/collections';
import type { LengthUnit } from '@/lib/units';
import { useCurrentCollection } from './current-collection';

/** The open collection with its display units and season start, for record screens. */
export function useCollectionSettings() {
  const { collection } = useCurrentCollection();
  const detail = useCollectionQuery(collection?.id);
  return {
    collectionId: collection?.id ?? '',
    role: collection?.role ?? 'viewer',
    canWrite: collection?.role === 'owner' || collection?.role === 'grower',
    isOwner: collection?.role === 'owner',
    units: (detail.data?.units ?? 'mm') as LengthUnit,
    seasonStartMonth: detail.data?.seasonStartMonth ?? 3,
  };
}
