import type { Readable } from 'node:stream';
import { parser } from 'stream-json';
import Assembler from 'stream-json/assembler.js';
import type { FieldIssue } from '@/shared/schemas/errors';
import { EXPORT_LISTS, exportHeaderSchema, type ExportDocument, type ExportListName, exportReferenceIssues, OPTIONAL_EXPORT_LISTS } from '@/shared/schemas/export';
import { fieldIssues, HttpError } from '../errors';
import { unstorableText } from '../validate';

/** The most field problems one answer lists; a file with more is broken throughout. */
export const MAX_RESTORE_ISSUES = 20;

interface Token {
  name: string;
  value?: unknown;
}

const problems = (details: FieldIssue[]) => new HttpError(400, 'invalid_input', 'The export file has problems; nothing was restored', details.slice(0, MAX_RESTORE_ISSUES));
const notJson = (reason: string) =>
  new HttpError(400, 'invalid_input', 'The file is not valid JSON; choose the .json file a Sympodia export gave you', [{ field: 'document', reason }]);

// What parse() refuses in text (server/validate.ts): NUL, and a lone UTF-16 surrogate.
const UNSTORABLE = /\u0000|[\ud800-\udbff](?![\udc00-\udfff])|(?<![\ud800-\udbff])[\udc00-\udfff]/;

const isList = (key: string): key is ExportListName => Object.hasOwn(EXPORT_LISTS, key);

/**
 * Reads a Sympodia export document from a stream (the uploaded file on disk) without holding
 * its text: stream-json's tokenizer feeds one record at a time to an assembler, and each record
 * is checked with its own schema (and for text PostgreSQL cannot store) as it arrives, so a
 * 60 MB file never becomes one string or one parse, and the event loop turns between chunks.
 * The fields around the lists are checked as the whole-document schema would, then the
 * references between records. Stops at the 20th field problem. Unknown top-level fields are
 * skipped unread, as the schema would strip them.
 */
export async function readExportDocument(source: Readable): Promise<ExportDocument> {
  const tokens = source.pipe(parser.asStream({ packValues: true, streamValues: false }));
  source.on('error', (error) => tokens.destroy(error));

  const header: Record<string, unknown> = {};
  const lists: Partial<Record<ExportListName, unknown[]>> = {};
  const issues: FieldIssue[] = [];
  let depth = 0;
  let key: string | null = null;
  // The value being assembled (a header field, or one record of `list`), or one being skipped.
  let assembler: Assembler | null = null;
  let list: ExportListName | null = null;
  let skipping = 0;
  let topIsObject = false;

  // Whether a string in the record being assembled cannot be stored (NUL, a lone surrogate):
  // only then is the record searched for its field.
  let unstorable = false;
  const record = (name: ExportListName, value: unknown) => {
    const items = lists[name]!;
    const index = items.length;
    const parsed = EXPORT_LISTS[name].safeParse(value);
    if (!parsed.success) {
      issues.push(...fieldIssues(parsed.error, `${name}.${index}`));
      items.push(null);
      return;
    }
    if (unstorable) issues.push(...unstorableText(parsed.data).map((i) => ({ field: `${name}.${index}.${i.field}`, reason: i.reason })));
    items.push(parsed.data);
  };

  const take = (token: Token): void => {
    if (skipping > 0) {
      if (token.name === 'startObject' || token.name === 'startArray') skipping += 1;
      else if (token.name === 'endObject' || token.name === 'endArray') skipping -= 1;
      return;
    }
    if (assembler) {
      if (token.name === 'stringValue' || token.name === 'keyValue') unstorable ||= UNSTORABLE.test(token.value as string);
      assembler.consume(token as never);
      if (!assembler.done) return;
      if (list) record(list, assembler.current);
      else header[key!] = assembler.current;
      assembler = null;
      unstorable = false;
      return;
    }
    if (depth === 0) {
      if (token.name !== 'startObject') throw notJson('not valid JSON for an export: the file holds no JSON object');
      topIsObject = true;
      depth = 1;
      return;
    }
    if (depth === 1) {
      if (token.name === 'endObject') {
        depth = 0;
        return;
      }
      if (token.name === 'keyValue') {
        key = token.value as string;
        return;
      }
      // The value of `key`.
      if (isList(key!) && token.name === 'startArray') {
        if (lists[key]) throw problems([{ field: key!, reason: `"${key}" appears twice` }]);
        lists[key] = [];
        list = key;
        depth = 2;
        return;
      }
      if (isList(key!) || Object.hasOwn(exportHeaderSchema.shape, key!)) {
        if (isList(key!)) issues.push({ field: key!, reason: 'Expected a list of records' });
        assembler = new Assembler();
        list = null;
        take(token);
        return;
      }
      if (token.name === 'startObject' || token.name === 'startArray') skipping = 1;
      return;
    }
    // depth 2: inside a list.
    if (token.name === 'endArray') {
      depth = 1;
      list = null;
      return;
    }
    assembler = new Assembler();
    take(token);
  };

  try {
    // 'data' handlers, not for await: the file has millions of tokens, and an await per token costs seconds.
    await new Promise<void>((resolve, reject) => {
      tokens.on('data', (token: Token) => {
        try {
          take(token);
        } catch (error) {
          reject(error);
          tokens.destroy();
          return;
        }
        if (issues.length >= MAX_RESTORE_ISSUES) {
          resolve();
          tokens.destroy();
        }
      });
      tokens.on('end', resolve);
      tokens.on('error', reject);
    });
  } catch (error) {
    if (error instanceof HttpError) throw error;
    throw notJson(`not valid JSON${error instanceof Error ? ` (${error.message.slice(0, 200)})` : ''}`);
  } finally {
    tokens.destroy();
    source.destroy();
  }
  if (issues.length > 0) throw problems(issues);
  if (!topIsObject) throw notJson('not valid JSON: the file is empty');

  const head = exportHeaderSchema.safeParse(header);
  if (!head.success) throw problems(fieldIssues(head.error));
  for (const name of Object.keys(EXPORT_LISTS) as ExportListName[]) {
    if (!lists[name]) {
      if (OPTIONAL_EXPORT_LISTS.has(name)) lists[name] = [];
      else issues.push({ field: name, reason: 'Missing: expected a list of records' });
    }
  }
  if (issues.length > 0) throw problems(issues);
  const document = { ...head.data, ...lists } as ExportDocument;
  const references = exportReferenceIssues(document);
  if (references.length > 0) throw problems(references.map((i) => ({ field: i.path.join('.'), reason: i.message })));
  return document;
}
