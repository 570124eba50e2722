// PMU file formats: CSV and COMTRADE writers and strict parsers (pure: strings and bytes).
export { FormatError, type FileFormat } from './errors';
export { parseCsv, parseCsvRecord, writeCsv, type CsvReadOptions, type CsvReport, type CsvWriteOptions, type ParsedCsv } from './csv';
export {
  comtradeTime,
  parseCff,
  parseComtrade,
  parseComtradeCfg,
  parseComtradeDetailed,
  writeCff,
  writeComtrade,
  type ComtradeFiles,
  type ComtradeFileType,
  type ComtradeHeader,
  type ComtradeReadOptions,
  type ComtradeWriteOptions,
  type ParsedComtrade,
} from './comtrade';
export { isoMs, parseIsoUtc, type NominalHz } from './common';
