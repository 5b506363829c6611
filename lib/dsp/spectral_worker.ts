/**
 * The worker side of {@linkcode spectralSink}: takes its group's chunks from
 * the shared ring in order, feeds them to one {@linkcode SpectralAccumulator}
 * (and, when asked, to each channel's signal checks first), frees each slot,
 * and at the end posts the estimate and the warnings (or the error) once.
 *
 * @module
 */
import { SpectralAccumulator } from "./spectral_core.ts";
import {
  END_OF_RECORD,
  type SpectralWorkerReply,
  type SpectralWorkerStart,
} from "./spectral_messages.ts";
import { SharedRing } from "../shared_ring.ts";
import { postedError } from "../workers.ts";
import { ChannelStatistics } from "../io/signal_checks.ts";

interface WorkerScope {
  onmessage: ((event: MessageEvent<SpectralWorkerStart>) => void) | null;
  postMessage(message: SpectralWorkerReply): void;
}
const scope = globalThis as unknown as WorkerScope;

scope.onmessage = (event) => {
  const { channelCount, options, ring: buffers, slotRows, checks } = event.data;
  const ring = SharedRing.attach(buffers);
  let accumulator: SpectralAccumulator | undefined;
  let statistics: ChannelStatistics[] = [];
  let failure: unknown;
  try {
    accumulator = new SpectralAccumulator(channelCount, options);
    statistics = (checks ?? []).map((c) => new ChannelStatistics(c.fullScale));
  } catch (error) {
    failure = error;
  }
  const views = new Array<Float64Array>(channelCount);
  for (;;) {
    const { data, count, flag } = ring.take();
    if (flag === END_OF_RECORD) break;
    if (failure === undefined) {
      for (let c = 0; c < channelCount; c++) {
        views[c] = data.subarray(c * slotRows, c * slotRows + count);
      }
      try {
        for (let c = 0; c < statistics.length; c++) statistics[c].push(views[c]);
        accumulator!.push(views);
      } catch (error) {
        failure = error; // keep freeing slots, so that the reader never waits for ever
      }
    }
    ring.release();
  }
  try {
    if (failure !== undefined) throw failure;
    const estimate = accumulator!.finish();
    if (checks === undefined) scope.postMessage({ estimate });
    else scope.postMessage({ estimate, warnings: checks.map((c, i) => statistics[i].warnings(c)) });
  } catch (error) {
    scope.postMessage({ error: postedError(error) });
  }
};
