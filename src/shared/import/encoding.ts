/**
 * Which character encoding a spreadsheet file was saved in. Spreadsheet programs write UTF-8
 * (with or without a byte-order mark), UTF-16 with a mark ("Unicode text"), or, in older Excel's
 * "CSV (Comma delimited)" on Western systems, Windows-1252 (Latin-1 with € and curly quotes in
 * 0x80–0x9F). Without a mark, bytes that are not valid UTF-8 are read as Windows-1252.
 */
export const FILE_ENCODINGS = ['utf-8', 'utf-16le', 'utf-16be', 'windows-1252'] as const;
export type FileEncoding = (typeof FILE_ENCODINGS)[number];

export const ENCODING_LABELS: Record<FileEncoding, string> = {
  'utf-8': 'UTF-8',
  'utf-16le': 'UTF-16 (little-endian)',
  'utf-16be': 'UTF-16 (big-endian)',
  'windows-1252': 'Windows-1252 (Western European, as older Excel saves CSV)',
};

/** The encoding a byte-order mark at the start names, and the mark's length; null without one. */
export function byteOrderMark(bytes: Uint8Array): { encoding: FileEncoding; length: number } | null {
  if (bytes[0] === 0xef && bytes[1] === 0xbb && bytes[2] === 0xbf) return { encoding: 'utf-8', length: 3 };
  if (bytes[0] === 0xff && bytes[1] === 0xfe) return { encoding: 'utf-16le', length: 2 };
  if (bytes[0] === 0xfe && bytes[1] === 0xff) return { encoding: 'utf-16be', length: 2 };
  return null;
}

export interface Utf8Scan {
  /** Index just past the last whole, valid sequence. */
  end: number;
  /** Index of the first byte that cannot be UTF-8; null when all is valid (a sequence cut off by the end of `bytes` is not invalid). */
  invalidAt: number | null;
  /** Whether any multi-byte sequence was seen before `end`. */
  nonAscii: boolean;
}

/**
 * Checks bytes as UTF-8 (RFC 3629: no overlong forms, no surrogates, nothing above U+10FFFF),
 * stopping at the first invalid byte or before a sequence that the end of `bytes` cuts off.
 */
export function scanUtf8(bytes: Uint8Array, from = 0): Utf8Scan {
  let nonAscii = false;
  let i = from;
  while (i < bytes.length) {
    const lead = bytes[i];
    if (lead < 0x80) {
      i += 1;
      continue;
    }
    const follow = lead >= 0xc2 && lead <= 0xdf ? 1 : lead >= 0xe0 && lead <= 0xef ? 2 : lead >= 0xf0 && lead <= 0xf4 ? 3 : -1;
    if (follow < 0) return { end: i, invalidAt: i, nonAscii };
    // The second byte's range rules out overlong forms (E0, F0), surrogates (ED) and > U+10FFFF (F4).
    const low = lead === 0xe0 ? 0xa0 : lead === 0xf0 ? 0x90 : 0x80;
    const high = lead === 0xed ? 0x9f : lead === 0xf4 ? 0x8f : 0xbf;
    for (let k = 1; k <= follow; k += 1) {
      if (i + k >= bytes.length) return { end: i, invalidAt: null, nonAscii };
      const b = bytes[i + k];
      if (k === 1 ? b < low || b > high : b < 0x80 || b > 0xbf) return { end: i, invalidAt: i, nonAscii };
    }
    nonAscii = true;
    i += follow + 1;
  }
  return { end: i, invalidAt: null, nonAscii };
}

/**
 * The encoding to read a file in, from its first bytes (the browser reads the header row with
 * it; the server decides again over the whole file as it streams).
 */
export function sniffEncoding(start: Uint8Array): FileEncoding {
  const mark = byteOrderMark(start);
  if (mark) return mark.encoding;
  return scanUtf8(start).invalidAt === null ? 'utf-8' : 'windows-1252';
}
