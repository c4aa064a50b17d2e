// Runs Lighthouse on one URL and prints the figures as JSON. Plain JavaScript on purpose:
// tsx's transform adds helpers to functions that Lighthouse sends into the page.
import * as chromeLauncher from 'chrome-launcher';
import fs from 'node:fs';
import lighthouse from 'lighthouse';

const [url, cookie] = process.argv.slice(2);
const chrome = await chromeLauncher.launch({
  chromePath: '/usr/bin/chromium',
  chromeFlags: ['--headless=new', '--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run', '--disable-quic'],
});
try {
  const result = await lighthouse(url, { port: chrome.port, output: 'json', logLevel: 'error', onlyCategories: ['performance'], extraHeaders: cookie ? { Cookie: cookie } : undefined });
  const { lhr } = result;
  // LIGHTHOUSE_REPORT_DIR=<folder>: keep each whole report for a closer look.
  const reportDir = process.env.LIGHTHOUSE_REPORT_DIR;
  if (reportDir) fs.writeFileSync(`${reportDir}/${process.env.LIGHTHOUSE_PAGE ?? 'page'}-${Date.now()}.json`, JSON.stringify(lhr));
  const requests = lhr.audits['network-requests']?.details?.items ?? [];
  const scripts = requests.filter((r) => r.resourceType === 'Script');
  const observed = lhr.audits.metrics?.details?.items?.[0] ?? {};
  // Scripts the browser asked for before the largest paint (observed, unthrottled timeline):
  // what the first screen needed. Chunks loaded later (the chart engine) are counted apart.
  const beforeLcp = scripts.filter((r) => r.networkRequestTime <= (observed.observedLargestContentfulPaint ?? Infinity));
  const sum = (items) => items.reduce((total, r) => total + (r.transferSize ?? 0), 0);
  const lcpElement = lhr.audits['largest-contentful-paint-element']?.details?.items?.[0]?.items?.[0]?.node;
  console.log(
    JSON.stringify({
      score: Math.round((lhr.categories.performance.score ?? 0) * 100),
      fcpMs: Math.round(lhr.audits['first-contentful-paint'].numericValue ?? 0),
      lcpMs: Math.round(lhr.audits['largest-contentful-paint'].numericValue ?? 0),
      tbtMs: Math.round(lhr.audits['total-blocking-time'].numericValue ?? 0),
      firstScreenJsBytes: sum(beforeLcp),
      allJsBytes: sum(scripts),
      fontBytes: sum(requests.filter((r) => r.resourceType === 'Font')),
      wasmBytes: requests.filter((r) => r.url.endsWith('.wasm')).reduce((total, r) => total + (r.transferSize ?? 0), 0),
      lcpElement: lcpElement ? `${lcpElement.selector ?? ''} ${lcpElement.snippet ?? ''}`.slice(0, 160) : null,
      runtimeError: lhr.runtimeError?.message ?? null,
      runtimeErrorCode: lhr.runtimeError?.code ?? null,
    }),
  );
} finally {
  await chrome.kill();
}
