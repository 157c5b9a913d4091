// Metro's defaults, plus the web fonts' file type (hooks/fonts.web.ts loads WOFF2) and a lighter zod.
/* global require, module, __dirname */
const path = require('node:path');
const { getDefaultConfig } = require('expo/metro-config');

const config = getDefaultConfig(__dirname);
config.resolver.assetExts.push('woff2');

const zodDir = `${path.sep}node_modules${path.sep}zod${path.sep}`;
const englishOnly = path.join(__dirname, 'metro', 'zod-locales.ts');
config.resolver.resolveRequest = (context, moduleName, platform) => {
  if (platform === 'web' && context.originModulePath.includes(zodDir) && /\/locales\/index\.js$/.test(moduleName)) {
    return { type: 'sourceFile', filePath: englishOnly };
  }
  return context.resolveRequest(context, moduleName, platform);
};

module.exports = config;
