/**
 * Expo's Metro config, with one change: zod's table of error-message languages resolves to a
 * table holding English only (shared/zodLocales.js). zod sets English itself and Trimout writes
 * its own messages; the other ~45 languages were about 270 KB of the web bundle (Metro keeps every
 * module that is imported, used or not).
 */
const path = require('node:path');
const { getDefaultConfig } = require('expo/metro-config');

const config = getDefaultConfig(__dirname);
const ZOD_LOCALES = /[\\/]node_modules[\\/]zod[\\/]v4[\\/]locales[\\/]index\.c?js$/;
const ENGLISH_ONLY = path.join(__dirname, 'shared', 'zodLocales.js');

config.resolver.resolveRequest = (context, moduleName, platform) => {
  const resolved = context.resolveRequest(context, moduleName, platform);
  if (resolved.type === 'sourceFile' && ZOD_LOCALES.test(resolved.filePath)) return { type: 'sourceFile', filePath: ENGLISH_ONLY };
  return resolved;
};

module.exports = config;
