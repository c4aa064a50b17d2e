// After `expo export --source-maps`: writes the route → chunk manifest the server uses to
// preload a page's chunks, removes the source maps (unless KEEP_SOURCE_MAPS=1), and
// precompresses the static files (Brotli at its best setting and gzip) so the server sends
// them without compressing on every request.
//
//   node scripts/web/postbuild.mjs [dist]
import fs from 'node:fs';
import path from 'node:path';
import { promisify } from 'node:util';
import zlib from 'node:zlib';

const root = path.resolve(process.argv[2] ?? 'dist');
const chunkDir = path.join(root, '_expo', 'static', 'js', 'web');
if (!fs.existsSync(chunkDir)) throw new Error(`No exported web build in ${root}`);

// 1. Which chunk holds which route file: read from each chunk's source map. A route file
//    (app/…) is the module an async route chunk is built around.
const manifest = {};
for (const name of fs.readdirSync(chunkDir).filter((f) => f.endsWith('.js.map'))) {
  const { sources = [] } = JSON.parse(fs.readFileSync(path.join(chunkDir, name), 'utf8'));
  for (const source of sources) {
    const match = /(?:^|\/)app\/(.+\.(?:tsx|ts|jsx|js))$/.exec(source.replace(/\\/g, '/'));
    if (!match || source.includes('node_modules')) continue;
    const chunk = `/_expo/static/js/web/${name.replace(/\.map$/, '')}`;
    if (/^(entry|__common|__expo-metro-runtime)-/.test(name)) continue; // loaded by index.html already
    manifest[match[1]] = chunk;
  }
}
if (Object.keys(manifest).length === 0) {
  throw new Error('No route chunks found in the source maps: was the build exported with --source-maps?');
}
fs.writeFileSync(path.join(root, 'route-chunks.json'), `${JSON.stringify(manifest, null, 2)}\n`);

// 2. Source maps are for looking at a build, not for serving.
if (process.env.KEEP_SOURCE_MAPS !== '1') {
  for (const name of fs.readdirSync(chunkDir).filter((f) => f.endsWith('.map'))) fs.rmSync(path.join(chunkDir, name));
}

// 3. Precompress. index.html is left out: the server writes a page's preloads into it.
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
  `[build] ${Object.keys(manifest).length} route chunks in route-chunks.json; ${files.length} files precompressed (${(raw / 1024).toFixed(0)} KiB → ${(packed / 1024).toFixed(0)} KiB Brotli)`,
);
