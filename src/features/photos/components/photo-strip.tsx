import * as ImagePicker from 'expo-image-picker';
import { useQueryClient } from '@tanstack/react-query';
import { useRef, useState } from 'react';
import { Image, Pressable, ScrollView, StyleSheet, View } from 'react-native';
import { ApiError } from '@/api/client';
import { photoKeys, usePhotosQuery } from '@/api/queries/photos';
import { Button } from '@/components/button';
import { QueryState } from '@/components/query-state';
import { Segmented } from '@/components/segmented';
import { Text } from '@/components/text';
import { formatDate } from '@/lib/dates';
import { API_BASE_URL } from '@/lib/env';
import type { Photo } from '@/shared/schemas/photos';
import { colors, radius, spacing } from '@/theme';
import { newClientKey } from '@/lib/uuid';
import { cancelUpload, formatBytes, isCancelled, type PhotoTarget, type Progress, uploadWithRetry, xhrSend } from '../upload';
import { PhotoViewer } from './photo-viewer';

const THUMB_HEIGHT = 96;

/** What follows an upload's name once it is no longer sending (a failure shows its reason below). */
const STATE_NOTES = { cancelling: ' · cancelling…', cancelled: ' · cancelled', failed: '' } as const;

interface Upload {
  id: number;
  name: string;
  progress: Progress;
  state: 'sending' | 'cancelling' | 'failed' | 'cancelled';
  error?: string;
  controller: AbortController;
  /** The key every attempt is sent under, by which a cancel reaches the server. */
  clientKey: string;
}

export interface PhotoStripProps {
  collectionId: string;
  /** Whose photos the strip shows: a plant's (every lead's and its own) or one lead's. */
  subject: { plantId: string } | { leadId: string };
  canWrite: boolean;
  canDelete: (photo: Photo) => boolean;
  /** Choices for what a new photo shows; the first is the default. */
  attachOptions: ReadonlyArray<{ label: string; target: PhotoTarget }>;
  /** A word under each thumbnail besides its date, such as the lead it shows. */
  describe?: (photo: Photo) => string | null;
  testID?: string;
}

/** A dated row of thumbnails, oldest first, with uploads in progress and a larger view on tap. */
export function PhotoStrip({ collectionId, subject, canWrite, canDelete, attachOptions, describe, testID }: PhotoStripProps) {
  const photos = usePhotosQuery(collectionId, subject);
  const client = useQueryClient();
  const [uploads, setUploads] = useState<Upload[]>([]);
  const [attach, setAttach] = useState('0');
  const [open, setOpen] = useState<number | null>(null);
  const [pickError, setPickError] = useState<string | null>(null);
  const nextId = useRef(1);

  const update = (id: number, change: Partial<Upload>) => setUploads((all) => all.map((u) => (u.id === id ? { ...u, ...change } : u)));

  async function send(file: File) {
    const id = nextId.current++;
    const controller = new AbortController();
    const clientKey = newClientKey();
    setUploads((all) => [...all, { id, name: file.name || 'photo', progress: { loaded: 0, total: file.size }, state: 'sending', controller, clientKey }]);
    const target = attachOptions[Number(attach)]?.target ?? attachOptions[0].target;
    try {
      await uploadWithRetry(xhrSend(collectionId, file, target, { clientKey }), {
        signal: controller.signal,
        onProgress: (progress) => update(id, { progress }),
      });
      // Cancelled as the answer came in: `cancel` removes it and says so.
      if (controller.signal.aborted) return;
      setUploads((all) => all.filter((u) => u.id !== id));
      await client.invalidateQueries({ queryKey: photoKeys.all(collectionId) });
    } catch (error) {
      if (isCancelled(error) || controller.signal.aborted) return;
      update(id, { state: 'failed', error: error instanceof ApiError ? error.message : 'The photo could not be sent' });
    }
  }

  /**
   * Stops sending, then tells the server, which may already hold the whole file: only its
   * answer makes "cancelled" true, so the row says "cancelling…" until then.
   */
  async function cancel(upload: Upload) {
    upload.controller.abort();
    update(upload.id, { state: 'cancelling' });
    try {
      await cancelUpload(collectionId, upload.clientKey);
      update(upload.id, { state: 'cancelled' });
    } catch (error) {
      // A refusal says why; no answer at all leaves the photo's fate unknown.
      const refused = error instanceof ApiError && error.status > 0;
      update(upload.id, {
        state: 'failed',
        error: refused
          ? `Stopped sending, but the server refused the cancel: ${error.message}. If the photo shows up here, delete it.`
          : 'Stopped sending, but the server could not be told. If the photo shows up here, delete it.',
      });
    } finally {
      await client.invalidateQueries({ queryKey: photoKeys.all(collectionId) });
    }
  }

  async function choose() {
    setPickError(null);
    try {
      const picked = await ImagePicker.launchImageLibraryAsync({ mediaTypes: ['images'], allowsMultipleSelection: true, quality: 1 });
      if (picked.canceled) return;
      const files = picked.assets.map((asset) => asset.file).filter((file): file is File => Boolean(file));
      if (files.length === 0) setPickError('The chosen photos could not be read from this device');
      await Promise.all(files.map(send));
    } catch {
      setPickError('The photo chooser could not be opened');
    }
  }

  return (
    <View style={styles.strip} testID={testID}>
      <QueryState query={photos} loadingLabel="Loading photos…">
        {(items) => (
          <>
            {items.length === 0 ? (
              <Text color="textMuted">{canWrite ? 'No photos yet. Add one to compare leads by eye over the seasons.' : 'No photos yet.'}</Text>
            ) : (
              <ScrollView horizontal contentContainerStyle={styles.row} accessibilityLabel="Photos, oldest first">
                {items.map((photo, index) => {
                  const note = describe?.(photo);
                  const label = `Photo of ${formatDate(photo.takenOn)}${note ? `, ${note}` : ''}${photo.caption ? `: ${photo.caption}` : ''}`;
                  return (
                    <Pressable
                      key={photo.id}
                      onPress={() => setOpen(index)}
                      accessibilityRole="button"
                      accessibilityLabel={`${label}. Open larger`}
                      style={styles.thumb}
                      testID="photo-thumb"
                    >
                      <Image
                        source={{ uri: `${API_BASE_URL}${photo.thumbUrl}` }}
                        accessibilityIgnoresInvertColors
                        style={{ height: THUMB_HEIGHT, width: (THUMB_HEIGHT * photo.thumbWidth) / photo.thumbHeight, borderRadius: radius.sm }}
                      />
                      <Text variant="caption" color="textMuted">
                        {formatDate(photo.takenOn)}
                        {note ? ` · ${note}` : ''}
                      </Text>
                    </Pressable>
                  );
                })}
              </ScrollView>
            )}
            {open !== null && items[open] ? (
              <PhotoViewer
                collectionId={collectionId}
                photos={items}
                index={open}
                onIndex={setOpen}
                onClose={() => setOpen(null)}
                canDelete={canDelete}
                describe={describe}
              />
            ) : null}
          </>
        )}
      </QueryState>

      {uploads.map((u) => {
        const percent = u.progress.total > 0 ? Math.min(100, Math.round((u.progress.loaded / u.progress.total) * 100)) : 0;
        return (
          <View key={u.id} style={styles.upload} testID="photo-upload">
            <Text variant="caption">
              {u.name} · {formatBytes(u.progress.total)}
              {u.state === 'sending' ? ` · ${percent}%` : STATE_NOTES[u.state]}
            </Text>
            {u.state === 'sending' ? (
              <View
                style={styles.track}
                role="progressbar"
                aria-label={`Sending ${u.name}`}
                aria-valuemin={0}
                aria-valuemax={100}
                aria-valuenow={percent}
              >
                <View style={[styles.bar, { width: `${percent}%` }]} />
              </View>
            ) : null}
            {u.state === 'failed' ? (
              <Text color="danger" role="alert">
                {u.error}
              </Text>
            ) : null}
            <View style={styles.actions}>
              {u.state === 'sending' ? (
                <Button label="Cancel" tone="quiet" onPress={() => cancel(u)} accessibilityLabel={`Cancel sending ${u.name}`} />
              ) : u.state === 'cancelling' ? null : (
                <Button label="Dismiss" tone="quiet" onPress={() => setUploads((all) => all.filter((x) => x.id !== u.id))} />
              )}
            </View>
          </View>
        );
      })}

      {canWrite ? (
        <View style={styles.add}>
          {attachOptions.length > 1 ? (
            <Segmented
              label="A new photo shows"
              value={attach}
              options={attachOptions.map((o, i) => ({ value: String(i), label: o.label }))}
              onChange={setAttach}
            />
          ) : null}
          <Button label="Add photos" tone="secondary" onPress={choose} testID="add-photos" />
          {pickError ? <Text color="danger">{pickError}</Text> : null}
          <Text variant="caption" color="textMuted">
            JPEG, PNG, WebP or HEIF, up to 20 MB each. Location and camera details are removed before saving.
          </Text>
        </View>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  strip: { gap: spacing.sm },
  row: { gap: spacing.sm, paddingVertical: spacing.xs },
  thumb: { gap: spacing.xxs, alignItems: 'flex-start' },
  upload: { gap: spacing.xs, padding: spacing.sm, borderRadius: radius.md, borderWidth: 1, borderColor: colors.border },
  track: { height: 8, borderRadius: radius.pill, backgroundColor: colors.surfaceMuted, overflow: 'hidden' },
  bar: { height: 8, backgroundColor: colors.accent },
  actions: { flexDirection: 'row', justifyContent: 'flex-end' },
  add: { gap: spacing.sm, alignItems: 'flex-start' },
});
