import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { photoListSchema } from '@/shared/schemas/photos';
import { request } from '../client';

export const photoKeys = {
  all: (c: string) => ['collections', c, 'photos'] as const,
  of: (c: string, subject: { plantId?: string; leadId?: string }) => ['collections', c, 'photos', subject] as const,
};

/** A plant's photos (all its leads' and its own) or one lead's, oldest first. */
export function usePhotosQuery(collectionId: string, subject: { plantId?: string; leadId?: string }) {
  const query = subject.plantId ? `plantId=${subject.plantId}` : `leadId=${subject.leadId}`;
  return useQuery({
    queryKey: photoKeys.of(collectionId, subject),
    queryFn: ({ signal }) => request(`/collections/${collectionId}/photos?${query}`, { schema: photoListSchema, signal }),
    select: (data) => data.items,
  });
}

export function useDeletePhotoMutation(collectionId: string) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (photoId: string) => request(`/collections/${collectionId}/photos/${photoId}`, { method: 'DELETE' }),
    onSuccess: () => client.invalidateQueries({ queryKey: photoKeys.all(collectionId) }),
  });
}
