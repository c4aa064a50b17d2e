// After `expo export --source-maps` (Expo Router's server output: client/ and server/): removes
// the browser's source maps (unless KEEP_SOURCE_MAPS=1) and precompresses the static files
// (Brotli at its best setting and gzip) so the server sends them without compressing on every
// request.
//
//   node scripts/web/postbuild.mjs [dist]
import fs from 'node:fs';
import path from 'node:path';
import { promisify } from 'node:util';
import zlib from 'node:zlib';

const root = path.resolve(process.argv[2] ?? 'dist', 'client');
const chunkDir = path.join(root, '_expo', 'static', 'js', 'web');
if (!fs.existsSync(chunkDir)) throw new Error(`No exported web build in ${root}`);
if (!fs.existsSync(path.join(root, '..', 'server', '_expo', 'server', 'render.js'))) {
  throw new Error(`${path.dirname(root)} has no server render module: app.json must ask for web.output "server"`);
}

// 1. Source maps are for looking at a build, not for serving.
if (process.env.KEEP_SOURCE_MAPS !== '1') {
  for (const name of fs.readdirSync(chunkDir).filter((f) => f.endsWith('.map'))) fs.rmSync(path.join(chunkDir, name));
}

// 2. Precompress. Pages are drawn per request, so there is no HTML here to compress.
const COMPRESSIBLE = /\.(js|css|json|wasm|svg|ico|ttf|otf|txt)$/;
const brotli = promisify(zlib.brotliCompress);
const gzip = promisify(zlib.gzip);
const files = [];
const walk = (dir) => {
  for (const entry of fs.readdirSync(dir, { withFileTypes: true })) {
    const file = path.join(dir, entry.name);
    if (entry.isDirectory()) walk(file);
    else if (COMPRESSIBLE.test(entry.name) && fs.statSync(file).size >= 1024) files.push(file);
  }
};
walk(root);
let raw = 0;
let packed = 0;
await Promise.all(
  files.map(async (file) => {
    const bytes = fs.readFileSync(file);
    const [br, gz] = await Promise.all([
      brotli(bytes, {
        params: {
          [zlib.constants.BROTLI_PARAM_QUALITY]: zlib.constants.BROTLI_MAX_QUALITY,
          [zlib.constants.BROTLI_PARAM_SIZE_HINT]: bytes.length,
        },
      }),
      gzip(bytes, { level: zlib.constants.Z_BEST_COMPRESSION }),
    ]);
    fs.writeFileSync(`${file}.br`, br);
    fs.writeFileSync(`${file}.gz`, gz);
    raw += bytes.length;
    packed += br.length;
  }),
);
console.log(
  `[build] ${files.length} files precompressed (${(raw / 1024).toFixed(0)} KiB → ${(packed / 1024).toFixed(0)} KiB Brotli)`,
);
