// The web bundle needs zod's English messages only; its full locale index (64 languages, about
// 42 KB gzipped) is swapped for this file by metro.config.js.
const en = require('zod/v4/locales/en.cjs');

module.exports = { en: en.default ?? en };
