import { Link, useRouter } from 'expo-router';
import Papa from 'papaparse';
import { useEffect, useRef, useState } from 'react';
import { Platform, StyleSheet, View } from 'react-native';
import { ApiError } from '@/api/client';
import { checkImportFile, type ImportProgress, runImportFile, useForgetCollectionData, useImportMappingMutation } from '@/api/queries/imports';
import { Button } from '@/components/button';
import { Card } from '@/components/card';
import { Screen } from '@/components/screen';
import { Segmented } from '@/components/segmented';
import { Text } from '@/components/text';
import { useCurrentCollection } from '@/features/collections/current-collection';
import { ENCODING_LABELS, sniffEncoding } from '@/shared/import/encoding';
import { type ColumnMapping, FIELD_LABELS, IMPORT_FIELDS, type ImportField, type LengthUnit, REQUIRED_FIELDS } from '@/shared/import/fields';
import type { DateOrder } from '@/shared/import/values';
import type { ImportCheck, ImportProgressLine } from '@/shared/schemas/imports';
import { IMPORT_MAX_BYTES } from '@/shared/schemas/imports';
import { colors, radius, spacing } from '@/theme';

type Counts = Extract<ImportProgressLine, { phase: 'done' }>['counts'];
const NOT_IN_FILE = '';
/** How much of the file's start decides the encoding its header row is read in. */
const SNIFF_BYTES = 64 * 1024;

/** The way back to Collection settings, where the import is reached from. */
function BackToCollection() {
  return (
    <Link href="/collection">
      <Text color="accent">‹ Collection</Text>
    </Link>
  );
}

/** Import from a spreadsheet: pick a CSV, map its columns, check it, then write it all at once. */
export function ImportScreen() {
  const { collection } = useCurrentCollection();
  if (!collection) return null;
  if (collection.role === 'viewer') {
    return (
      <Screen title="Import records" testID="import-screen">
        <BackToCollection />
        <Card>
          <Text>Viewers can read this collection but not import into it. Ask an owner for the grower role.</Text>
        </Card>
      </Screen>
    );
  }
  return <ImportFlow collectionId={collection.id} />;
}

function ImportFlow({ collectionId }: { collectionId: string }) {
  const router = useRouter();
  const input = useRef<HTMLInputElement | null>(null);
  const mappingQuery = useImportMappingMutation(collectionId);
  const forget = useForgetCollectionData(collectionId);
  const [file, setFile] = useState<File | null>(null);
  const [fileError, setFileError] = useState<string | null>(null);
  const [headers, setHeaders] = useState<string[]>([]);
  const [mapping, setMapping] = useState<ColumnMapping>({});
  const [dateOrder, setDateOrder] = useState<DateOrder | null>(null);
  const [heightUnit, setHeightUnit] = useState<LengthUnit | null>(null);
  const [check, setCheck] = useState<ImportCheck | null>(null);
  const [checking, setChecking] = useState(false);
  const [checkError, setCheckError] = useState<string | null>(null);
  const [progress, setProgress] = useState<ImportProgress | null>(null);
  const [runError, setRunError] = useState<string | null>(null);
  const [done, setDone] = useState<Counts | null>(null);

  const reset = () => {
    setCheck(null);
    setCheckError(null);
    setRunError(null);
  };

  const pick = (picked: File | undefined) => {
    setDone(null);
    reset();
    setHeaders([]);
    setFileError(null);
    if (!picked) {
      setFile(null);
      mappingQuery.reset();
      return;
    }
    if (picked.size > IMPORT_MAX_BYTES) {
      setFile(null);
      return setFileError(`${picked.name} is larger than 20 MB; split it into parts and import each.`);
    }
    setFile(picked);
    readHeaderRow(picked).catch(() => setFileError('This file could not be read.'));
  };

  // Only the header row is read here, in the encoding the file's first bytes show (the server
  // decides again over the whole file and says which it read).
  const readHeaderRow = async (picked: File) => {
    const encoding = sniffEncoding(new Uint8Array(await picked.slice(0, SNIFF_BYTES).arrayBuffer()));
    Papa.parse<string[]>(picked, {
      preview: 1,
      encoding,
      complete: (result) => {
        const row = (result.data[0] ?? []).map((h, i) => (i === 0 ? h.replace(/^\uFEFF/, '') : h).trim());
        if (row.length === 0 || row.every((h) => !h)) return setFileError('This file has no header row. The first row must name the columns.');
        setHeaders(row);
        mappingQuery.mutate(row, {
          onSuccess: (answer) => {
            setMapping(answer.mapping);
            setDateOrder(answer.dateOrder);
            setHeightUnit(answer.heightUnit);
          },
        });
      },
      error: () => setFileError('This file could not be read as CSV.'),
    });
  };

  const options = { mapping, dateOrder, heightUnit };
  const runCheck = async (next = options) => {
    if (!file) return;
    setChecking(true);
    setCheckError(null);
    try {
      setCheck(await checkImportFile(collectionId, file, next));
    } catch (error) {
      setCheck(null);
      setCheckError(describe(error));
    } finally {
      setChecking(false);
    }
  };

  // A changed choice re-checks at once, so the report always matches what Import would do.
  const choose = (change: Partial<typeof options>) => {
    const next = { ...options, ...change };
    if (change.dateOrder !== undefined) setDateOrder(change.dateOrder);
    if (change.heightUnit !== undefined) setHeightUnit(change.heightUnit);
    if (check) void runCheck(next);
  };

  const runImport = async () => {
    if (!file) return;
    setRunError(null);
    setProgress({ phase: 'sending', done: 0, total: file.size });
    try {
      const counts = await runImportFile(collectionId, file, options, setProgress);
      setDone(counts);
      await forget();
    } catch (error) {
      setRunError(describe(error));
    } finally {
      setProgress(null);
    }
  };

  const missingRequired = REQUIRED_FIELDS.filter((f) => !mapping[f]);
  const mappingReady = headers.length > 0 && mappingQuery.isSuccess;

  return (
    <Screen title="Import records" subtitle="Past records from a spreadsheet saved as CSV" testID="import-screen">
      <BackToCollection />
      {Platform.OS !== 'web' ? (
        <Card>
          <Text>Importing a spreadsheet works in the web version of Sympodia, on a phone or a computer.</Text>
        </Card>
      ) : (
        <Card title="1. Choose the file">
          <Text color="textMuted">
            One row per measurement: the plant's tag and the lead's label, then any of the date, height, leaves, sheath, root tips and bloom dates. The first row names the columns.
          </Text>
          <input
            ref={input}
            type="file"
            accept=".csv,text/csv"
            aria-label="Spreadsheet file (CSV)"
            data-testid="import-file-input"
            style={{ display: 'none' }}
            onChange={(event) => {
              pick(event.currentTarget.files?.[0]);
              event.currentTarget.value = '';
            }}
          />
          <Button label={file ? 'Choose another file' : 'Choose a CSV file'} tone={file ? 'secondary' : 'primary'} testID="import-choose" onPress={() => input.current?.click()} />
          {file ? (
            <Text testID="import-file-name">
              <Text variant="bodyStrong">{file.name}</Text> · {formatBytes(file.size)}
            </Text>
          ) : null}
          {fileError ? (
            <Text color="danger" role="alert">
              {fileError}
            </Text>
          ) : null}
          {mappingQuery.isError ? (
            <Text color="danger" role="alert">
              {describe(mappingQuery.error)}
            </Text>
          ) : null}
        </Card>
      )}

      {mappingReady && !done ? (
        <Card title="2. Match the columns" testID="import-mapping">
          <Text color="textMuted">
            {mappingQuery.data?.source === 'remembered' ? 'The columns are matched as in your last import of a file like this one.' : 'Sympodia matched the columns by their names; check each one.'}
          </Text>
          {IMPORT_FIELDS.map((field) => (
            <FieldPicker
              key={field}
              field={field}
              headers={headers}
              value={mapping[field]}
              onChange={(column) => {
                reset();
                setMapping((m) => {
                  const next = { ...m };
                  if (column === NOT_IN_FILE) delete next[field];
                  else next[field] = column;
                  return next;
                });
              }}
            />
          ))}
          {missingRequired.length > 0 ? (
            <Text color="danger" role="alert">
              Choose the column for {missingRequired.map((f) => FIELD_LABELS[f].toLowerCase()).join(' and ')}.
            </Text>
          ) : null}
          <Button label="Check the file" testID="import-check" loading={checking} disabled={missingRequired.length > 0 || checking} onPress={() => void runCheck()} />
          {checkError ? (
            <Text color="danger" role="alert" testID="import-check-error">
              {checkError}
            </Text>
          ) : null}
        </Card>
      ) : null}

      {check && !done ? (
        <Card title="3. Check what will be saved" testID="import-report">
          <Text color="textMuted" testID="import-encoding">
            Read as {ENCODING_LABELS[check.encoding]}
            {check.encoding === 'utf-8' ? '.' : '. If accents look wrong below, save the file again as “CSV UTF-8” and choose it again.'}
          </Text>
          {check.dateOrder.needed || check.dateOrder.used ? (
            <View style={styles.choice}>
              <Text variant="label">How are the dates written?</Text>
              {check.dateOrder.needed ? <Text color="warning">Every date in this file could be read either way; choose the order.</Text> : null}
              <Segmented<DateOrder | ''>
                label="Date order"
                testID="import-date-order"
                value={dateOrder ?? check.dateOrder.used ?? ''}
                options={[
                  { value: 'dmy', label: 'Day/month/year' },
                  { value: 'mdy', label: 'Month/day/year' },
                ]}
                onChange={(v) => choose({ dateOrder: v || null })}
              />
            </View>
          ) : null}
          {mapping.height_mm && !check.heightUnit.fromHeader ? (
            <View style={styles.choice}>
              <Text variant="label">Heights written without a unit are in</Text>
              <Segmented<LengthUnit | ''>
                label="Height unit"
                testID="import-height-unit"
                value={heightUnit ?? ''}
                options={[
                  { value: 'mm', label: 'mm' },
                  { value: 'cm', label: 'cm' },
                  { value: 'in', label: 'inches' },
                ]}
                onChange={(v) => choose({ heightUnit: v || null })}
              />
            </View>
          ) : null}

          <Summary check={check} />
          <Preview check={check} />
          <Issues check={check} />

          {check.ready ? (
            <Button label={`Import ${check.counts.rows} rows`} testID="import-run" loading={progress !== null} disabled={progress !== null} onPress={() => void runImport()} />
          ) : (
            <Text color="danger" testID="import-not-ready">
              Nothing has been saved. Fix the file (or the choices above) and check it again.
            </Text>
          )}
          {progress ? <ProgressBar progress={progress} /> : null}
          {runError ? (
            <Text color="danger" role="alert" testID="import-run-error">
              {runError}
            </Text>
          ) : null}
        </Card>
      ) : null}

      {done ? (
        <Card title="Imported" testID="import-done">
          <Text role="status">
            {done.plants.added} plants, {done.leads.added} leads, {done.measurements.added} measurements and {done.blooms.added + done.blooms.filled} bloom records added
            {done.measurements.filled ? `; ${done.measurements.filled} measurements completed` : ''}.
          </Text>
          <Text color="textMuted">
            Already there: {done.plants.matched} plants, {done.leads.matched} leads, {done.measurements.already} measurements. Importing the same file again adds nothing.
          </Text>
          <View style={styles.actions}>
            <Button label="Open Plants" testID="import-open-plants" onPress={() => router.push('/plants')} />
            <Button label="Import another file" tone="secondary" onPress={() => pick(undefined)} />
          </View>
        </Card>
      ) : null}
    </Screen>
  );
}

function FieldPicker({ field, headers, value, onChange }: { field: ImportField; headers: string[]; value: string | undefined; onChange: (column: string) => void }) {
  const id = `import-map-${field}`;
  const required = REQUIRED_FIELDS.includes(field);
  return (
    <View style={styles.pickerRow}>
      <label htmlFor={id} style={{ flex: 1, minWidth: 140 }}>
        <Text variant="label">
          {FIELD_LABELS[field]}
          {required ? ' (needed)' : ''}
        </Text>
      </label>
      <select
        id={id}
        data-testid={id}
        value={value ?? NOT_IN_FILE}
        onChange={(event) => onChange(event.currentTarget.value)}
        style={{ flex: 1, minWidth: 160, minHeight: 44, fontSize: 16, padding: 8, borderRadius: 8, border: `1px solid ${colors.border}`, background: colors.surface, color: colors.text }}
      >
        <option value={NOT_IN_FILE}>Not in this file</option>
        {headers.map((h, i) => (h ? <option key={`${h}-${i}`} value={h}>{h}</option> : null))}
      </select>
    </View>
  );
}

function Summary({ check }: { check: ImportCheck }) {
  const c = check.counts;
  return (
    <View style={styles.block} testID="import-summary">
      <Text variant="bodyStrong">
        {c.rows} rows{c.blankRows ? ` (${c.blankRows} blank skipped)` : ''}
      </Text>
      <Text>
        New: {c.plants.added} plants, {c.leads.added} leads, {c.measurements.added} measurements, {c.blooms.added} bloom records
        {c.measurements.filled ? `; ${c.measurements.filled} measurements completed` : ''}
        {c.blooms.filled ? `; ${c.blooms.filled} bloom records completed` : ''}.
      </Text>
      <Text color="textMuted">
        Already there: {c.plants.matched} plants, {c.leads.matched} leads, {c.measurements.already} measurements.
      </Text>
    </View>
  );
}

function Preview({ check }: { check: ImportCheck }) {
  if (check.preview.length === 0) return null;
  return (
    <View style={styles.block} testID="import-preview">
      <Text variant="heading">First rows as they will be saved</Text>
      {check.preview.map((p) => (
        <View key={p.row} style={styles.previewRow} testID={`import-preview-row-${p.row}`}>
          <Text variant="label">
            Row {p.row} · {p.tag} {p.name} · lead {p.lead}
            {p.season ? ` (${p.season})` : ''}
          </Text>
          <Text variant="caption" color="textMuted">
            {p.date ? `${p.date}: ${p.heightMm ?? '—'} mm` : 'no measurement'}
            {p.leafCount !== null ? `, ${p.leafCount} leaves` : ''}
            {p.sheath ? `, sheath ${p.sheath}` : ''}
            {p.rootTips !== null ? `, ${p.rootTips} root tips` : ''} ·{' '}
            {p.plant === 'new' ? 'new plant' : 'plant on file'}, {p.leadStatus === 'new' ? 'new lead' : 'lead on file'}
            {p.measurement === 'already' ? ', measurement already there' : p.measurement === 'filled' ? ', fills in the stored measurement’s empty counts' : ''}
          </Text>
        </View>
      ))}
    </View>
  );
}

function Issues({ check }: { check: ImportCheck }) {
  if (check.issueCount === 0) {
    return (
      <Text color="success" testID="import-no-issues">
        No problems found.
      </Text>
    );
  }
  return (
    <View style={styles.block} testID="import-issues">
      <Text variant="heading" role="alert">
        {check.issueCount} {check.issueCount === 1 ? 'problem' : 'problems'} to fix
      </Text>
      <View role="table" aria-label="Problems by row and column">
        <View role="row" style={styles.issueRow}>
          <Text role="columnheader" variant="label" style={styles.rowCell}>
            Row
          </Text>
          <Text role="columnheader" variant="label" style={styles.columnCell}>
            Column
          </Text>
          <Text role="columnheader" variant="label" style={styles.reasonCell}>
            Reason
          </Text>
        </View>
        {check.issues.map((issue, i) => (
          <View role="row" key={`${issue.row}-${issue.column}-${i}`} style={styles.issueRow}>
            <Text role="cell" style={styles.rowCell}>
              {issue.row}
            </Text>
            <Text role="cell" variant="bodyStrong" style={styles.columnCell}>
              {issue.column}
            </Text>
            <Text role="cell" style={styles.reasonCell}>
              {issue.reason}
            </Text>
          </View>
        ))}
      </View>
      {check.issueCount > check.issues.length ? <Text color="textMuted">The first {check.issues.length} are shown.</Text> : null}
    </View>
  );
}

function ProgressBar({ progress }: { progress: ImportProgress }) {
  const share = progress.total > 0 ? Math.min(1, progress.done / progress.total) : 0;
  // Sending counts as the first fifth of the bar; writing fills the rest.
  const value = Math.round(progress.phase === 'sending' ? share * 20 : 20 + share * 80);
  const [label, setLabel] = useState('');
  useEffect(() => {
    setLabel(progress.phase === 'sending' ? 'Sending the file…' : `Saving ${progress.done} of ${progress.total} records…`);
  }, [progress]);
  return (
    <View style={styles.block}>
      <View role="progressbar" aria-label="Import progress" aria-valuemin={0} aria-valuemax={100} aria-valuenow={value} style={styles.track} testID="import-progress">
        <View style={[styles.fill, { width: `${value}%` }]} />
      </View>
      <Text variant="caption" color="textMuted" accessibilityLiveRegion="polite">
        {label}
      </Text>
    </View>
  );
}

function describe(error: unknown): string {
  if (error instanceof ApiError) {
    const details = error.details.filter((d) => d.field.startsWith('mapping.') || d.field === 'file' || d.field.startsWith('query'));
    return details.length > 0 ? `${error.message}: ${details.map((d) => d.reason).join('; ')}` : error.message;
  }
  return 'Something went wrong; try again.';
}

const formatBytes = (n: number) => (n < 1024 * 1024 ? `${Math.max(1, Math.round(n / 1024))} KB` : `${(n / 1024 / 1024).toFixed(1)} MB`);

const styles = StyleSheet.create({
  choice: { gap: spacing.sm },
  block: { gap: spacing.sm },
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.md },
  pickerRow: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: spacing.sm },
  previewRow: { gap: 2, paddingVertical: spacing.xs, borderBottomWidth: 1, borderBottomColor: colors.borderSubtle },
  issueRow: { flexDirection: 'row', gap: spacing.sm, paddingVertical: spacing.xs, borderBottomWidth: 1, borderBottomColor: colors.borderSubtle },
  rowCell: { width: 44 },
  columnCell: { width: 110 },
  reasonCell: { flex: 1 },
  track: { height: 14, borderRadius: radius.md, backgroundColor: colors.surfaceMuted, borderWidth: 1, borderColor: colors.border, overflow: 'hidden' },
  fill: { height: '100%', backgroundColor: colors.accent },
});
