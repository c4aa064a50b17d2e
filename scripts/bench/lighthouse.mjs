// Runs Lighthouse on one URL and prints the figures as JSON. Plain JavaScript on purpose:
// tsx's transform adds helpers to functions that Lighthouse sends into the page.
import * as chromeLauncher from 'chrome-launcher';
import lighthouse from 'lighthouse';

const [url, cookie] = process.argv.slice(2);
const chrome = await chromeLauncher.launch({
  chromePath: '/usr/bin/chromium',
  chromeFlags: ['--headless=new', '--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run', '--disable-quic'],
});
try {
  const result = await lighthouse(url, { port: chrome.port, output: 'json', logLevel: 'error', onlyCategories: ['performance'], extraHeaders: cookie ? { Cookie: cookie } : undefined });
  const { lhr } = result;
  const requests = lhr.audits['network-requests']?.details?.items ?? [];
  const scripts = requests.filter((r) => r.resourceType === 'Script');
  console.log(
    JSON.stringify({
      score: Math.round((lhr.categories.performance.score ?? 0) * 100),
      lcpMs: Math.round(lhr.audits['largest-contentful-paint'].numericValue ?? 0),
      tbtMs: Math.round(lhr.audits['total-blocking-time'].numericValue ?? 0),
      firstScreenJsBytes: scripts.reduce((sum, r) => sum + (r.transferSize ?? 0), 0),
      wasmBytes: requests.filter((r) => r.url.endsWith('.wasm')).reduce((sum, r) => sum + (r.transferSize ?? 0), 0),
      runtimeError: lhr.runtimeError?.message ?? null,
    }),
  );
} finally {
  await chrome.kill();
}
