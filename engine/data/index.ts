/** Data loading: CSV text → column tables, header reading, row selection. */
export * from './types';
export { parseCsvText, parseCsvBytes, readCsv, readCsvHead, bytesSource, stripBom, type ByteSource } from './csv';
export { detectDelimiter, delimiterName } from './delimiter';
export { isMissingCell, parseNumberCell } from './cells';
export { readHeaderText, readHeaderFile, readHeader, headerLookup, HEADER_MAX_BYTES, type HeaderInfo, type HeaderOptions, type HeaderResult } from './header';
export { distinctLabels, readColumnLabels, labelLookup, LABEL_MAX_BYTES } from './labels';
export { selectRows, type RowFilter, type SelectRequest, type Selection, type SelectResult } from './select';
export { loadDataFile, sampleDataFile, sampleFromBytes, sha256Hex, SAMPLE_MAX_BYTES, SAMPLE_ROWS, type FileReader, type LoadedData, type LoadResult, type SampleResult } from './load';
