/**
 * File input and output shared by the CLI and the editor: inputs are read
 * only when they are regular files (input.ts); outputs are checked against
 * every declared input by file identity (guard.ts, identity.ts) and written
 * all-or-nothing through temporary files and renames (stage.ts). Every
 * writer of the project goes through this module.
 */
export { fileIdentity, realLocation, sameFile, type FileIdentity } from './identity';
export { fileKind, inputStatus, InputError, openInput, openInputSync, readInput, readInputHead, readInputHeadSync, readInputSync, type FileKind, type HeadOptions, type InputStatus } from './input';
export { clashMessage, dataFilePath, declaredInputs, OutputGuard, type Clash, type InputFile, type OutputTarget } from './guard';
export { OutputError, OutputStage, TargetExistsError, writeAllOrNothing, type StagedContent, type StageHooks } from './stage';
