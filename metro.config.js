// Metro (Expo web export) configuration: Expo's defaults plus one size trim.
const path = require('node:path');
const { getDefaultConfig } = require('expo/metro-config');

const config = getDefaultConfig(__dirname);
const zodLocalesEn = path.join(__dirname, 'scripts', 'metro', 'zod-locales-en.js');
const upstream = config.resolver.resolveRequest;

config.resolver.resolveRequest = (context, moduleName, platform) => {
  if (/^\.\.\/locales\/index(\.c?js)?$/.test(moduleName) && /[\\/]zod[\\/]v4[\\/](classic|core|mini)[\\/]/.test(context.originModulePath)) {
    return { type: 'sourceFile', filePath: zodLocalesEn };
  }
  return (upstream ?? context.resolveRequest)(context, moduleName, platform);
};

module.exports = config;
