/** Tool name and version recorded in result provenance (from package.json). */
import pkg from '../../package.json';

export const TOOL_NAME = 'leastwise';
export const TOOL_VERSION: string = pkg.version;
