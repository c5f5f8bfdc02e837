/** Data loading: CSV text → column tables, header reading, row selection. */
export * from './types';
export { parseCsvText, parseCsvBytes, readCsv, bytesSource, stripBom, type ByteSource } from './csv';
export { detectDelimiter, delimiterName } from './delimiter';
export { isMissingCell, parseNumberCell } from './cells';
export { readHeaderText, readHeaderFile, readHeader, headerLookup, HEADER_MAX_BYTES, type HeaderInfo, type HeaderOptions, type HeaderResult } from './header';
export { selectRows, type RowFilter, type SelectRequest, type Selection, type SelectResult } from './select';
export { loadDataFile, sha256Hex, type FileReader, type LoadedData, type LoadResult } from './load';
