/** Every http(s) link in a mail's plain text, in order. */
export function linksIn(text: string): string[] {
  return Array.from(text.matchAll(/https?:\/\/[^\s<>"')]+/g), (m) => m[0]);
}
