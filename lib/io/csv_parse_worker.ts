/**
 * A CSV parse worker of {@linkcode readCsvInWorkers}: takes segments from the
 * shared counter and parses them into its ring until none is left
 * ({@linkcode parseSegmentsInWorker}).
 *
 * @module
 */
import { type CsvWorkerReply, type CsvWorkerStart, parseSegmentsInWorker } from "./csv_parallel.ts";

interface WorkerScope {
  onmessage: ((event: MessageEvent<CsvWorkerStart>) => void) | null;
  postMessage(message: CsvWorkerReply): void;
}
const scope = globalThis as unknown as WorkerScope;

/** How long to wait for a free slot before concluding that the reading thread has gone. */
const STALL_MS = 300_000;

scope.onmessage = (event) => {
  parseSegmentsInWorker(event.data, (reply) => scope.postMessage(reply), STALL_MS);
};
