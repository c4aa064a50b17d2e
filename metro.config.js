// Expo's Metro defaults, plus:
// - inline requires (below);
// - WOFF2 as an asset type, for the subset Source Sans 3 files written by
//   scripts/fonts/subset.mjs;
// - zod's namespace of ~50 translated error-message locales replaced by English alone.
//   `export * as locales` in zod's entries keeps them all in the bundle (Metro does not drop
//   unused namespace re-exports); the app never selects another locale.
// - likewise zod's JSON Schema conversion and its ahead-of-time compiler (about 70 KB
//   minified, in the chunk every screen loads), which the app never calls.
const path = require('node:path');
const { getDefaultConfig } = require('expo/metro-config');

const config = getDefaultConfig(__dirname);
// Inline requires: a module runs when first used rather than when the bundle starts, which
// takes a share of start-up work off a slow phone's main thread before the first screen.
config.transformer.getTransformOptions = async () => ({ transform: { experimentalImportSupport: true, inlineRequires: true } });
config.resolver.assetExts = [...config.resolver.assetExts, 'woff2'];

const ZOD_LOCALES_EN = path.join(__dirname, 'scripts', 'metro', 'zod-locales-en.js');
const ZOD_ENTRY = /node_modules[\\/]zod[\\/]v4[\\/](classic[\\/]external|mini[\\/]external|core[\\/]index)\.js$/;
const ZOD_FILE = /node_modules[\\/]zod[\\/]v4[\\/]/;
const ZOD_STAND_INS = {
  'to-json-schema.js': path.join(__dirname, 'scripts', 'metro', 'zod-without-json-schema.js'),
  'json-schema-processors.js': path.join(__dirname, 'scripts', 'metro', 'zod-without-json-schema.js'),
  'json-schema-generator.js': path.join(__dirname, 'scripts', 'metro', 'zod-without-json-schema.js'),
  'from-json-schema.js': path.join(__dirname, 'scripts', 'metro', 'zod-without-json-schema.js'),
  'compile.js': path.join(__dirname, 'scripts', 'metro', 'zod-without-compiler.js'),
};
const upstreamResolve = config.resolver.resolveRequest;
config.resolver.resolveRequest = (context, moduleName, platform) => {
  if (moduleName === '../locales/index.js' && ZOD_ENTRY.test(context.originModulePath)) {
    return { type: 'sourceFile', filePath: ZOD_LOCALES_EN };
  }
  const standIn = ZOD_FILE.test(context.originModulePath) && /^\.\.?\//.test(moduleName) ? ZOD_STAND_INS[path.basename(moduleName)] : undefined;
  if (standIn) return { type: 'sourceFile', filePath: standIn };
  return (upstreamResolve ?? context.resolveRequest)(context, moduleName, platform);
};

module.exports = config;
