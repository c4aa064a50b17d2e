// Skia's web build loads canvaskit.wasm at run time; the app serves it from public/.
const fs = require('node:fs');
const path = require('node:path');

const source = path.join(__dirname, '..', 'node_modules', 'canvaskit-wasm', 'bin', 'full', 'canvaskit.wasm');
const target = path.join(__dirname, '..', 'public', 'canvaskit.wasm');

if (!fs.existsSync(source)) {
  console.warn('canvaskit.wasm not found; charts will not draw on web');
  process.exit(0);
}
fs.mkdirSync(path.dirname(target), { recursive: true });
fs.copyFileSync(source, target);
