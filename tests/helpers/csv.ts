/** A recording as the CSV text quiver reads (no time column: give the rate), for CLI tests. */
import type { Recording } from "../../lib/io/recording.ts";
import { formatCsv } from "../../lib/io/table.ts";

/** The recording's channels as CSV columns headed `name [unit]`. */
export function recordingCsv(recording: Recording): string {
  return formatCsv({
    metadata: {},
    columns: recording.channels.map((c) => ({ name: c.name, unit: c.unit, values: c.data })),
  });
}
