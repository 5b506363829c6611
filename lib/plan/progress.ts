/**
 * Progress of a campaign on stderr: a bar redrawn in place on a terminal,
 * plain lines otherwise (logs, CI).
 *
 * @module
 */
import process from "node:process";

/** Reports steps as they start and end. */
export interface Progress {
  /** A step begins. */
  start(index: number, label: string): void;
  /** A step ended. */
  end(index: number, label: string, ok: boolean, seconds: number, detail?: string): void;
}

/**
 * Progress on `stream` for `total` steps; `tty` chooses the bar.
 *
 * @example
 * ```ts
 * import { createProgress } from "./progress.ts";
 * const lines: string[] = [];
 * const p = createProgress(2, { write: (s: string) => { lines.push(s); return true; } }, false);
 * p.start(1, "spectrum road_psd");
 * p.end(1, "spectrum road_psd", true, 0.25);
 * if (!lines.join("").includes("[1/2] spectrum road_psd: ok (0.25 s)")) throw new Error();
 * ```
 */
export function createProgress(
  total: number,
  stream: { write(text: string): boolean } = process.stderr,
  tty: boolean = process.stderr.isTTY === true,
): Progress {
  const bar = (done: number) => {
    const width = 24;
    const filled = Math.round((width * done) / total);
    return `[${"#".repeat(filled)}${"-".repeat(width - filled)}]`;
  };
  return {
    start(index, label) {
      if (tty) stream.write(`\r\x1b[2K${bar(index - 1)} ${index}/${total} ${label}`);
      else stream.write(`[${index}/${total}] ${label}\n`);
    },
    end(index, label, ok, seconds, detail) {
      const status = `${ok ? "ok" : "FAILED"} (${seconds.toFixed(2)} s)${
        detail !== undefined ? `: ${detail}` : ""
      }`;
      if (tty) stream.write(`\r\x1b[2K${bar(index)} ${index}/${total} ${label} ${status}\n`);
      else stream.write(`[${index}/${total}] ${label}: ${status}\n`);
    },
  };
}
