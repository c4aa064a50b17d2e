import { Platform } from 'react-native';

/**
 * Whether this device can save a downloaded file and pick one to send (the web app can). The
 * same on the server that draws the web page as in the browser, so the two draws agree.
 */
export const canHandleFiles = Platform.OS === 'web';
const inBrowser = () => canHandleFiles && typeof document !== 'undefined';

/** Hands a downloaded file to the browser, which saves it as `fileName`. */
export function saveFile(blob: Blob, fileName: string): void {
  if (!inBrowser()) throw new Error('Saving files works in the web app; open Sympodia in a browser to export');
  const url = URL.createObjectURL(blob);
  const link = document.createElement('a');
  link.href = url;
  link.download = fileName;
  link.rel = 'noopener';
  link.style.display = 'none';
  document.body.appendChild(link);
  link.click();
  link.remove();
  // The browser has taken the file once the click has been handled.
  setTimeout(() => URL.revokeObjectURL(url), 30_000);
}

/** Opens the system file chooser for one JSON file; null when the person cancels. */
export function pickJsonFile(): Promise<File | null> {
  if (!inBrowser()) return Promise.reject(new Error('Choosing a file works in the web app; open Sympodia in a browser to restore'));
  return new Promise((resolve) => {
    const input = document.createElement('input');
    input.type = 'file';
    input.accept = '.json,application/json';
    input.style.display = 'none';
    const done = (file: File | null) => {
      input.remove();
      resolve(file);
    };
    input.addEventListener('change', () => done(input.files?.[0] ?? null), { once: true });
    input.addEventListener('cancel', () => done(null), { once: true });
    document.body.appendChild(input);
    input.click();
  });
}
