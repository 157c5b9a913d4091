// Metro's defaults, plus the web fonts' file type (hooks/fonts.web.ts loads WOFF2) and a lighter zod
// (English messages only, no JSON Schema converters, no ahead-of-time compiler: see metro/).
/* global require, module, __dirname */
const path = require('node:path');
const { getDefaultConfig } = require('expo/metro-config');

const config = getDefaultConfig(__dirname);
config.resolver.assetExts.push('woff2');

const zodDir = `${path.sep}node_modules${path.sep}zod${path.sep}`;
const englishOnly = path.join(__dirname, 'metro', 'zod-locales.ts');
const noJsonSchema = path.join(__dirname, 'metro', 'zod-no-json-schema.ts');
const noCompile = path.join(__dirname, 'metro', 'zod-no-compile.ts');
const jsonSchemaModules = /\/(json-schema-processors|to-json-schema|from-json-schema|json-schema-generator)\.js$/;
config.resolver.resolveRequest = (context, moduleName, platform) => {
  if (platform === 'web' && context.originModulePath.includes(zodDir)) {
    if (/\/locales\/index\.js$/.test(moduleName)) return { type: 'sourceFile', filePath: englishOnly };
    if (jsonSchemaModules.test(moduleName)) return { type: 'sourceFile', filePath: noJsonSchema };
    if (/\/compile\.js$/.test(moduleName)) return { type: 'sourceFile', filePath: noCompile };
  }
  return context.resolveRequest(context, moduleName, platform);
};

module.exports = config;
