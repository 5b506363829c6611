/**
 * The worker side of {@linkcode spectralSink}: takes chunks from the shared
 * ring in order, feeds them to one {@linkcode SpectralAccumulator}, frees
 * each slot, and at the end posts the estimate (or the error) once.
 *
 * @module
 */
import { SpectralAccumulator } from "./spectral_core.ts";
import type { SpectralWorkerReply, SpectralWorkerStart } from "./spectral_pipeline.ts";
import { CONSUMED, END, LENGTHS, WRITTEN } from "./spectral_ring.ts";

interface WorkerScope {
  onmessage: ((event: MessageEvent<SpectralWorkerStart>) => void) | null;
  postMessage(message: SpectralWorkerReply): void;
}
const scope = globalThis as unknown as WorkerScope;

scope.onmessage = (event) => {
  const { channelCount, options, control: controlBuffer, data, slots, slotRows } = event.data;
  const control = new Int32Array(controlBuffer);
  let accumulator: SpectralAccumulator | undefined;
  let failure: unknown;
  try {
    accumulator = new SpectralAccumulator(channelCount, options);
  } catch (error) {
    failure = error;
  }
  const views = new Array<Float64Array>(channelCount);
  for (let consumed = 0;; consumed++) {
    while (Atomics.load(control, WRITTEN) === consumed) Atomics.wait(control, WRITTEN, consumed);
    const slot = consumed % slots;
    const rows = Atomics.load(control, LENGTHS + slot);
    if (rows === END) break;
    if (failure === undefined) {
      for (let c = 0; c < channelCount; c++) {
        views[c] = new Float64Array(data, 8 * ((slot * channelCount + c) * slotRows), rows);
      }
      try {
        accumulator!.push(views);
      } catch (error) {
        failure = error; // keep freeing slots, so that the reader never waits for ever
      }
    }
    Atomics.store(control, CONSUMED, consumed + 1);
    Atomics.notify(control, CONSUMED);
  }
  try {
    if (failure !== undefined) throw failure;
    scope.postMessage({ estimate: accumulator!.finish() });
  } catch (error) {
    const e = error as {
      name?: string;
      message?: string;
      detail?: string;
      kind?: "data" | "usage";
    };
    scope.postMessage({
      error: {
        name: e.name ?? "Error",
        message: e.message ?? String(error),
        detail: e.detail,
        kind: e.kind,
      },
    });
  }
};
