import iconv from 'iconv-lite';
import { describe, expect, it } from 'vitest';
import { byteOrderMark, scanUtf8, sniffEncoding } from '@/shared/import/encoding';

const bytes = (...b: number[]) => Uint8Array.from(b);

// Valid and invalid sequences after RFC 3629 §4 (the UTF-8 syntax) and Unicode's Table 3-7.
describe('scanUtf8', () => {
  it.each([
    ['ASCII', Buffer.from('Plant Tag,Genus'), { end: 15, invalidAt: null, nonAscii: false }],
    ['two-byte é', Buffer.from('é'), { end: 2, invalidAt: null, nonAscii: true }],
    ['three-byte €', Buffer.from('€'), { end: 3, invalidAt: null, nonAscii: true }],
    ['four-byte 🌸', Buffer.from('🌸'), { end: 4, invalidAt: null, nonAscii: true }],
  ])('accepts %s', (_name, input, expected) => {
    expect(scanUtf8(input)).toEqual(expected);
  });

  it.each([
    ['a Latin-1 é followed by ASCII', bytes(0x52, 0xe9, 0x73), 1],
    ['a lone continuation byte', bytes(0x80), 0],
    ['an overlong /', bytes(0xc0, 0xaf), 0],
    ['an overlong three-byte form', bytes(0xe0, 0x80, 0xaf), 0],
    ['a UTF-16 surrogate written as UTF-8', bytes(0xed, 0xa0, 0x80), 0],
    ['a code point above U+10FFFF', bytes(0xf4, 0x90, 0x80, 0x80), 0],
    ['0xFF', bytes(0x41, 0xff), 1],
  ])('stops at %s', (_name, input, at) => {
    expect(scanUtf8(input).invalidAt).toBe(at);
  });

  it('stops before a sequence the end cuts off, without calling it invalid', () => {
    const euro = Buffer.from('a€');
    expect(scanUtf8(euro.subarray(0, 3))).toEqual({ end: 1, invalidAt: null, nonAscii: false });
  });
});

describe('sniffEncoding and byte-order marks', () => {
  it.each([
    [bytes(0xef, 0xbb, 0xbf, 0x41), 'utf-8', 3],
    [bytes(0xff, 0xfe, 0x41, 0x00), 'utf-16le', 2],
    [bytes(0xfe, 0xff, 0x00, 0x41), 'utf-16be', 2],
  ])('a mark names the encoding: %j', (input, encoding, length) => {
    expect(byteOrderMark(input)).toEqual({ encoding, length });
    expect(sniffEncoding(input)).toBe(encoding);
  });

  it('reads valid UTF-8 as UTF-8 and anything else as Windows-1252', () => {
    expect(sniffEncoding(Buffer.from('Tag,Genre\nA-1,Señorita'))).toBe('utf-8');
    expect(sniffEncoding(iconv.encode('Tag,Genre\nA-1,Señorita', 'windows-1252'))).toBe('windows-1252');
    // A sample cut in the middle of a character is still UTF-8.
    expect(sniffEncoding(Buffer.from('Tag,€').subarray(0, 5))).toBe('utf-8');
  });
});
