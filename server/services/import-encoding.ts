import { Transform, type TransformCallback } from 'node:stream';
import iconv from 'iconv-lite';
import { byteOrderMark, type FileEncoding, scanUtf8 } from '@/shared/import/encoding';
import { HttpError } from '../errors';

const mixedEncodings = (byte: number) => {
  const reason = `The file mixes UTF-8 with another encoding (byte ${byte + 1} is not UTF-8); save it again as "CSV UTF-8" and import that`;
  return new HttpError(400, 'mixed_encoding', reason, [{ field: 'file', reason }]);
};

/**
 * Turns a spreadsheet file's bytes into text as they stream, in the encoding it was saved in
 * (src/shared/import/encoding.ts): a byte-order mark decides (and is dropped); otherwise the
 * bytes are read as UTF-8 while they are valid UTF-8, and a file whose first invalid byte comes
 * before any non-ASCII character is read as Windows-1252 from the start (ASCII reads the same in
 * both, so nothing emitted changes). A file that has valid non-ASCII UTF-8 and then bytes that are
 * not is refused (400 mixed_encoding): either reading would store something mangled.
 * `encoding` is the final answer once the stream has ended.
 */
export class SpreadsheetDecoder extends Transform {
  encoding: FileEncoding = 'utf-8';
  private state: 'start' | 'utf-8' | 'other' = 'start';
  private pending: Buffer = Buffer.alloc(0);
  private nonAscii = false;
  private offset = 0;
  private other: { write: (b: Buffer) => string; end: () => string | undefined } | null = null;

  constructor() {
    super({ readableObjectMode: false, decodeStrings: true, encoding: 'utf8' });
  }

  override _transform(chunk: Buffer, _encoding: BufferEncoding, done: TransformCallback): void {
    try {
      this.decodeBytes(chunk, false);
      done();
    } catch (error) {
      done(error as Error);
    }
  }

  override _flush(done: TransformCallback): void {
    try {
      this.decodeBytes(Buffer.alloc(0), true);
      const rest = this.other?.end();
      if (rest) this.push(rest);
      done();
    } catch (error) {
      done(error as Error);
    }
  }

  private switchTo(encoding: FileEncoding): void {
    this.encoding = encoding;
    this.state = encoding === 'utf-8' ? 'utf-8' : 'other';
    if (encoding !== 'utf-8') this.other = iconv.getDecoder(encoding, { stripBOM: false });
  }

  private decodeBytes(chunk: Buffer, atEnd: boolean): void {
    let bytes: Buffer = this.pending.length > 0 ? Buffer.concat([this.pending, chunk]) : chunk;
    this.pending = Buffer.alloc(0);
    if (this.state === 'start') {
      // A mark needs its first 3 bytes (or the end of a shorter file).
      if (bytes.length < 3 && !atEnd) {
        this.pending = bytes;
        return;
      }
      const mark = byteOrderMark(bytes);
      this.switchTo(mark?.encoding ?? 'utf-8');
      if (mark) bytes = bytes.subarray(mark.length);
    }
    if (this.state === 'other') {
      if (bytes.length > 0) this.push(this.other!.write(bytes));
      return;
    }
    const scan = scanUtf8(bytes);
    // A sequence the end of the file cuts off is as invalid as any other byte.
    const invalidAt = scan.invalidAt ?? (atEnd && scan.end < bytes.length ? scan.end : null);
    this.nonAscii ||= scan.nonAscii;
    if (invalidAt === null) {
      if (scan.end > 0) this.push(bytes.toString('utf8', 0, scan.end));
      this.pending = Buffer.from(bytes.subarray(scan.end));
      this.offset += scan.end;
      return;
    }
    if (this.nonAscii) throw mixedEncodings(this.offset + invalidAt);
    // Everything emitted so far was ASCII, which Windows-1252 reads the same: read on in it.
    this.switchTo('windows-1252');
    this.push(this.other!.write(bytes));
  }
}
