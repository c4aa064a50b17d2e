import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { ApiError } from '@/api/client';
import { type ExportKind, useDownloadExportMutation, useRestoreMutation } from '@/api/queries/export';
import { useAreasQuery, usePlantsQuery } from '@/api/queries/records';
import { Button } from '@/components/button';
import { Card } from '@/components/card';
import { Confirm } from '@/components/confirm';
import { QueryState } from '@/components/query-state';
import { Segmented } from '@/components/segmented';
import { Text } from '@/components/text';
import { formatDate } from '@/lib/dates';
import type { Role } from '@/shared/schemas/auth';
import { type ExportDocument, exportDocumentSchema, RESTORE_MAX_BYTES, type RestoreResult } from '@/shared/schemas/export';
import { colors, radius, spacing } from '@/theme';
import { canHandleFiles, pickJsonFile, saveFile } from './export-files';

const PHOTO_OPTIONS = [
  { value: 'yes', label: 'With photos' },
  { value: 'no', label: 'Without photos' },
] as const;

const count = (n: number, one: string, many = `${one}s`) => `${n.toLocaleString()} ${n === 1 ? one : many}`;

function formatSize(bytes: number): string {
  if (bytes >= 1024 * 1024) return `${(bytes / 1024 / 1024).toFixed(1)} MB`;
  return `${Math.max(1, Math.round(bytes / 1024))} KB`;
}

/** Collection settings › Export: the zip and JSON downloads (every member) and, into an empty collection, a restore (owners). */
export function ExportCard({ collectionId, role }: { collectionId: string; role: Role }) {
  return (
    <Card title="Export" testID="export-card">
      <Text color="textMuted">Take a copy of the whole collection, for your own backup or to move it elsewhere.</Text>
      <Download collectionId={collectionId} kind="zip" />
      <Download collectionId={collectionId} kind="json" />
      {role === 'owner' ? <RestoreWhenEmpty collectionId={collectionId} /> : null}
    </Card>
  );
}

function Download({ collectionId, kind }: { collectionId: string; kind: ExportKind }) {
  const download = useDownloadExportMutation(collectionId);
  const [photos, setPhotos] = useState<'yes' | 'no'>('yes');
  const [received, setReceived] = useState(0);
  const [saved, setSaved] = useState<string | null>(null);
  const [saveError, setSaveError] = useState<string | null>(null);

  const start = () => {
    setReceived(0);
    setSaved(null);
    setSaveError(null);
    download.mutate(
      { kind, withPhotos: photos === 'yes', onProgress: setReceived },
      {
        onSuccess: ({ blob, fileName }) => {
          try {
            saveFile(blob, fileName);
            setSaved(`${fileName} (${formatSize(blob.size)})`);
          } catch (error) {
            setSaveError((error as Error).message);
          }
        },
      },
    );
  };

  const zip = kind === 'zip';
  return (
    <View style={styles.section} testID={`export-${kind}-section`}>
      <Text variant="bodyStrong">{zip ? 'Spreadsheet files (zip)' : 'Sympodia backup (JSON)'}</Text>
      <Text variant="caption" color="textMuted">
        {zip
          ? 'One CSV file per kind of record (plants, leads, measurements, bloom records, care entries, areas, photos, members), and records.csv with a row per measurement that the spreadsheet import reads back as it is. Opens in Excel, Numbers, LibreOffice or Google Sheets.'
          : 'Every record in one file: the file to keep, and the one a restore into an empty collection reads. Photos are not in it; take the zip for those.'}
      </Text>
      {zip ? (
        <Segmented label="Photos in the zip" value={photos} options={PHOTO_OPTIONS} onChange={setPhotos} disabled={download.isPending} testID="export-photos" />
      ) : null}
      <View style={styles.row}>
        <Button
          label={zip ? 'Download zip' : 'Download JSON'}
          tone="secondary"
          loading={download.isPending}
          disabled={!canHandleFiles}
          onPress={start}
          testID={`export-${kind}`}
        />
        {download.isPending ? (
          <Text variant="caption" color="textMuted" accessibilityLiveRegion="polite">
            {received > 0 ? `${formatSize(received)} received…` : 'Preparing the export…'}
          </Text>
        ) : null}
      </View>
      {saved && !download.isPending ? (
        <Text variant="caption" color="success" accessibilityLiveRegion="polite" testID={`export-${kind}-done`}>
          Saved {saved}
        </Text>
      ) : null}
      {download.error || saveError ? (
        <Text color="danger" role="alert">
          {saveError ?? (download.error instanceof ApiError ? download.error.message : 'The export could not be downloaded')}
        </Text>
      ) : null}
      {!canHandleFiles ? (
        <Text variant="caption" color="textMuted">
          Downloads work in the web app; open Sympodia in a browser.
        </Text>
      ) : null}
    </View>
  );
}

/** The restore is offered only while the collection has no areas and no plants (the server checks again). */
function RestoreWhenEmpty({ collectionId }: { collectionId: string }) {
  const plants = usePlantsQuery(collectionId, { pageSize: 1 });
  const areas = useAreasQuery(collectionId);
  // Held here, not in the form: the form goes once the collection fills, and the answer must outlive it.
  const restore = useRestoreMutation(collectionId);
  const both = {
    data: plants.data && areas.data ? { plants: plants.data.total, areas: areas.data.length } : undefined,
    isPending: plants.isPending || areas.isPending,
    isError: plants.isError || areas.isError,
    error: plants.error ?? areas.error,
    refetch: () => Promise.all([plants.refetch(), areas.refetch()]),
  };
  if (restore.data) return <RestoreSummary result={restore.data} />;
  // While the file is being written the collection fills up; the form stays (same place, same state) until the answer.
  const writing = restore.isPending;
  const query = writing ? { ...both, data: both.data ?? { plants: 0, areas: 0 }, isPending: false, isError: false } : both;
  return (
    <QueryState query={query} loadingLabel="Checking whether the collection is empty…">
      {(size) => (writing || (size.plants === 0 && size.areas === 0) ? <Restore restore={restore} /> : null)}
    </QueryState>
  );
}

interface Chosen {
  file: File;
  doc: ExportDocument;
}

function describeProblem(error: ApiError): string[] {
  return error.details.slice(0, 5).map((d) => `${d.field}: ${d.reason}`);
}

function Restore({ restore }: { restore: ReturnType<typeof useRestoreMutation> }) {
  const [chosen, setChosen] = useState<Chosen | null>(null);
  const [checking, setChecking] = useState(false);
  const [problems, setProblems] = useState<string[]>([]);
  const [progress, setProgress] = useState({ sent: 0, total: 0 });

  async function choose() {
    setProblems([]);
    setChosen(null);
    restore.reset();
    let file: File | null;
    try {
      file = await pickJsonFile();
    } catch (error) {
      setProblems([(error as Error).message]);
      return;
    }
    if (!file) return;
    if (file.size > RESTORE_MAX_BYTES) {
      setProblems([`${file.name} is ${formatSize(file.size)}; a restore takes files up to ${formatSize(RESTORE_MAX_BYTES)}.`]);
      return;
    }
    setChecking(true);
    try {
      // The same schema the server applies, so a wrong file is named before anything is sent.
      const parsed = exportDocumentSchema.safeParse(JSON.parse((await file.text()).replace(/^\uFEFF/, '')));
      if (parsed.success) setChosen({ file, doc: parsed.data });
      else setProblems([`${file.name} is not an export this version of Sympodia can restore:`, ...parsed.error.issues.slice(0, 5).map((i) => `${i.path.join('.') || 'file'}: ${i.message}`)]);
    } catch {
      setProblems([`${file.name} is not a JSON file. Choose the .json file that “Download JSON” saved.`]);
    } finally {
      setChecking(false);
    }
  }

  function confirm() {
    if (!chosen) return;
    setProgress({ sent: 0, total: chosen.file.size });
    restore.mutate({ file: chosen.file, onProgress: setProgress });
  }

  const percent = progress.total > 0 ? Math.min(100, Math.round((progress.sent / progress.total) * 100)) : 0;
  const error = restore.error instanceof ApiError ? restore.error : null;
  const doc = chosen?.doc;

  return (
    <View style={[styles.section, styles.restore]} testID="restore-section">
      <Text variant="bodyStrong" role="heading" aria-level={3}>
        Restore from a Sympodia export
      </Text>
      <Text variant="caption" color="textMuted">
        This collection is empty, so it can be filled from a JSON export. It keeps its name and takes the file’s growth-year start, units and location; every
        record gets a new id. Photos are not in the JSON file and are not restored.
      </Text>
      {!chosen ? (
        <Button label="Choose export file" tone="secondary" loading={checking} disabled={!canHandleFiles} onPress={choose} testID="restore-choose" />
      ) : null}
      {problems.length > 0 ? (
        <View role="alert" style={styles.problems}>
          {problems.map((p, i) => (
            <Text key={i} color="danger" variant={i === 0 ? 'body' : 'caption'}>
              {p}
            </Text>
          ))}
        </View>
      ) : null}
      {doc && chosen && !restore.isPending ? (
        <Confirm
          message={`Restore “${doc.collection.name}” (exported ${formatDate(doc.exportedAt.slice(0, 10))}) into this collection: ${count(doc.plants.length, 'plant')}, ${count(doc.leads.length, 'lead')}, ${count(doc.measurements.length, 'measurement')}, ${count(doc.careEntries.length, 'care entry', 'care entries')}?`}
          confirmLabel="Restore"
          onConfirm={confirm}
          onCancel={() => {
            setChosen(null);
            restore.reset();
          }}
        />
      ) : null}
      {restore.isPending ? (
        <View style={styles.section}>
          <Text variant="caption" accessibilityLiveRegion="polite">
            {percent < 100 ? `Sending ${chosen?.file.name ?? 'the file'} · ${percent}%` : 'Writing the records…'}
          </Text>
          <View style={styles.track} role="progressbar" aria-label="Restoring the export" aria-valuemin={0} aria-valuemax={100} aria-valuenow={percent}>
            <View style={[styles.bar, { width: `${percent}%` }]} />
          </View>
        </View>
      ) : null}
      {restore.error ? (
        <View role="alert" style={styles.problems}>
          <Text color="danger">{error?.message ?? 'The restore failed; nothing was changed'}</Text>
          {error ? describeProblem(error).map((p, i) => (
            <Text key={i} color="danger" variant="caption">
              {p}
            </Text>
          )) : null}
        </View>
      ) : null}
    </View>
  );
}

function RestoreSummary({ result }: { result: RestoreResult }) {
  const r = result.restored;
  return (
    <View style={[styles.section, styles.done]} role="status" testID="restore-done">
      <Text variant="bodyStrong" color="success">
        Restored from “{result.exportedFrom}”
      </Text>
      <Text>
        {count(r.plants, 'plant')}, {count(r.leads, 'lead')}, {count(r.measurements, 'measurement')}, {count(r.bloomRecords, 'bloom record')},{' '}
        {count(r.careEntries, 'care entry', 'care entries')} and {count(r.areas, 'area')}.
      </Text>
      {result.photosSkipped > 0 ? (
        <Text variant="caption" color="textMuted">
          {count(result.photosSkipped, 'photo')} described in the file {result.photosSkipped === 1 ? 'was' : 'were'} left out: the JSON export holds no picture
          files.
        </Text>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  section: { gap: spacing.sm },
  row: { flexDirection: 'row', alignItems: 'center', flexWrap: 'wrap', gap: spacing.md },
  restore: { borderTopWidth: 1, borderTopColor: colors.borderSubtle, paddingTop: spacing.md },
  problems: { gap: spacing.xs },
  done: { padding: spacing.md, borderRadius: radius.md, backgroundColor: colors.successSoft },
  track: { height: 8, borderRadius: radius.pill, backgroundColor: colors.surfaceMuted, overflow: 'hidden' },
  bar: { height: 8, backgroundColor: colors.accent },
});
