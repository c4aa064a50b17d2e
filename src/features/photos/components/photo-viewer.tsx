import { useEffect, useState } from 'react';
import { Image, Modal, Platform, ScrollView, StyleSheet, useWindowDimensions, View } from 'react-native';
import { ApiError } from '@/api/client';
import { useDeletePhotoMutation } from '@/api/queries/photos';
import { Button } from '@/components/button';
import { Confirm } from '@/components/confirm';
import { Text } from '@/components/text';
import { formatDate } from '@/lib/dates';
import { API_BASE_URL } from '@/lib/env';
import type { Photo } from '@/shared/schemas/photos';
import { colors, spacing } from '@/theme';

export interface PhotoViewerProps {
  collectionId: string;
  photos: Photo[];
  index: number;
  onIndex: (index: number) => void;
  onClose: () => void;
  canDelete: (photo: Photo) => boolean;
  describe?: (photo: Photo) => string | null;
}

/** One photo large, with previous and next (buttons or the arrow keys) and Escape to close. */
export function PhotoViewer({ collectionId, photos, index, onIndex, onClose, canDelete, describe }: PhotoViewerProps) {
  const photo = photos[index];
  const { width, height } = useWindowDimensions();
  const remove = useDeletePhotoMutation(collectionId);
  const [confirming, setConfirming] = useState(false);
  const hasPrevious = index > 0;
  const hasNext = index < photos.length - 1;

  useEffect(() => {
    if (Platform.OS !== 'web') return;
    const onKey = (event: KeyboardEvent) => {
      if (event.key === 'ArrowLeft' && hasPrevious) onIndex(index - 1);
      else if (event.key === 'ArrowRight' && hasNext) onIndex(index + 1);
      else if (event.key === 'Escape') onClose();
    };
    window.addEventListener('keydown', onKey);
    return () => window.removeEventListener('keydown', onKey);
  }, [index, hasPrevious, hasNext, onIndex, onClose]);

  const maxWidth = Math.min(width - 2 * spacing.md, 1000);
  const maxHeight = Math.max(200, height - 260);
  const scale = Math.min(maxWidth / photo.width, maxHeight / photo.height, 1);
  const note = describe?.(photo);
  const title = `${formatDate(photo.takenOn)}${note ? ` · ${note}` : ''}`;

  return (
    <Modal visible transparent animationType="fade" onRequestClose={onClose}>
      <View style={styles.backdrop} aria-modal role="dialog" aria-label={`Photo of ${title}`} testID="photo-viewer">
        <ScrollView contentContainerStyle={styles.content}>
          <Text variant="heading" color="onAccent">
            {title}
          </Text>
          <Text color="onAccent" variant="caption">
            {index + 1} of {photos.length}
          </Text>
          <Image
            source={{ uri: `${API_BASE_URL}${photo.displayUrl}` }}
            accessibilityLabel={`Photo of ${title}${photo.caption ? `: ${photo.caption}` : ''}`}
            style={{ width: photo.width * scale, height: photo.height * scale }}
            testID="photo-large"
          />
          {photo.caption ? <Text color="onAccent">{photo.caption}</Text> : null}
          <View style={styles.row}>
            <Button label="‹ Previous" tone="secondary" disabled={!hasPrevious} onPress={() => onIndex(index - 1)} testID="photo-previous" />
            <Button label="Next ›" tone="secondary" disabled={!hasNext} onPress={() => onIndex(index + 1)} testID="photo-next" />
            <Button label="Close" tone="secondary" onPress={onClose} testID="photo-close" />
          </View>
          {canDelete(photo) ? (
            confirming ? (
              <Confirm
                message={`Delete the photo of ${formatDate(photo.takenOn)}? It cannot be brought back.`}
                confirmLabel="Delete photo"
                busy={remove.isPending}
                onCancel={() => setConfirming(false)}
                onConfirm={() =>
                  remove.mutate(photo.id, {
                    onSuccess: () => {
                      setConfirming(false);
                      if (photos.length <= 1) onClose();
                      else onIndex(Math.max(0, index - (hasNext ? 0 : 1)));
                    },
                  })
                }
              />
            ) : (
              <Button label="Delete photo" tone="danger" onPress={() => setConfirming(true)} />
            )
          ) : null}
          {remove.error ? <Text color="onAccent">{remove.error instanceof ApiError ? remove.error.message : 'The photo could not be deleted'}</Text> : null}
        </ScrollView>
      </View>
    </Modal>
  );
}

const styles = StyleSheet.create({
  backdrop: { flex: 1, backgroundColor: 'rgba(20, 24, 18, 0.97)' },
  content: { padding: spacing.md, gap: spacing.sm, alignItems: 'center' },
  row: { flexDirection: 'row', gap: spacing.sm, flexWrap: 'wrap', justifyContent: 'center' },
});
