/**
 * Reading and writing: recordings (every format of formats/mod.ts) in chunks or whole, channel
 * set-ups, units, result tables and safe writes.
 *
 * @example
 * ```ts
 * import { parseCsvRecording, recordingSource } from "./mod.ts";
 * const rec = parseCsvRecording("time_s,acc [g]\n0,1\n0.001,2\n0.002,3\n");
 * if (rec.rate !== 1000 || recordingSource(rec).length !== 3) throw new Error();
 * ```
 *
 * @module
 */
export { QuiverError } from "../errors.ts";
export {
  type Channel,
  CHANNEL_ROLES,
  type ChannelRole,
  type Recording,
  selectChannels,
} from "./recording.ts";
export { parseCsvRecording } from "./csv_reader.ts";
export type { CsvReadOptions } from "./csv_recording.ts";
export { type NumericCsv, parseNumericCsv } from "./csv_table.ts";
export { encodeWav, parseWav, type WavEncoding } from "./wav.ts";
export { readRecordingFile, type ReadRecordingOptions } from "./read_recording.ts";
export {
  collectRecording,
  openRecordingStream,
  type RecordingSource,
  recordingSource,
  type RecordingStream,
} from "./recording_stream.ts";
export {
  applyChannelSetup,
  type ChannelSetup,
  channelSetupSchema,
  parseChannelSetup,
} from "./channel_setup.ts";
export { type BaseUnit, baseUnit, STANDARD_GRAVITY } from "./units.ts";
export { channelWarnings } from "./signal_checks.ts";
export {
  type EmptyCells,
  formatCsv,
  formatJson,
  noteEmptyCells,
  restoreFormula,
  type Table,
  type TableColumn,
  type TableMetadata,
} from "./table.ts";
export { checkName, escapeName } from "./names.ts";
export { readSidecar, type Sidecar, writeCsvPair } from "./table_file.ts";
export { numericColumn, readResultFile, type ResultTable } from "./result_file.ts";
export {
  RESULT_METADATA,
  type ResultAnalysis,
  type ResultMetadata,
  resultMetadata,
} from "./result_metadata.ts";
export { writeFileAtomic } from "./atomic_write.ts";
export { assertRegularFile } from "./file_kinds.ts";
