/**
 * The worker side of {@linkcode spectralSink}: feeds its group's chunks to
 * one {@linkcode SpectralAccumulator} (and, when asked, to each channel's
 * signal checks first) and at the end posts the estimate and the warnings
 * (or the error) once. The chunks come from the shared ring in order, each
 * slot freed after use, or from the worker's own read of the file when the
 * start message holds a recipe to open it again.
 *
 * @module
 */
import { SpectralAccumulator } from "./spectral_core.ts";
import {
  END_OF_RECORD,
  type SpectralWorkerReply,
  type SpectralWorkerStart,
  type WorkerGroup,
} from "./spectral_messages.ts";
import { type RingBuffers, SharedRing } from "../shared_ring.ts";
import type { StreamRecipe } from "../io/recording_stream.ts";
import { postedError } from "../workers.ts";
import { ChannelStatistics } from "../io/signal_checks.ts";

interface WorkerScope {
  onmessage: ((event: MessageEvent<SpectralWorkerStart>) => void) | null;
  postMessage(message: SpectralWorkerReply): void;
}
const scope = globalThis as unknown as WorkerScope;

/** The group's accumulator and signal checks, fed chunk by chunk. */
class GroupWork {
  readonly accumulator: SpectralAccumulator;
  readonly statistics: ChannelStatistics[];

  constructor(start: WorkerGroup) {
    this.accumulator = new SpectralAccumulator(start.channelCount, start.options);
    this.statistics = (start.checks ?? []).map((c) => new ChannelStatistics(c.fullScale));
  }

  push(chunk: readonly Float64Array[]): void {
    for (let c = 0; c < this.statistics.length; c++) this.statistics[c].push(chunk[c]);
    this.accumulator.push(chunk);
  }
}

/** Takes the ring's slots until the end of the record, pushing each while nothing failed. */
function drainRing(
  start: WorkerGroup & { ring: RingBuffers; slotRows: number },
  work: GroupWork | undefined,
): unknown {
  const ring = SharedRing.attach(start.ring);
  const { channelCount, slotRows } = start;
  const views = new Array<Float64Array>(channelCount);
  let failure: unknown;
  for (;;) {
    const { data, count, flag } = ring.take();
    if (flag === END_OF_RECORD) break;
    if (failure === undefined && work !== undefined) {
      for (let c = 0; c < channelCount; c++) {
        views[c] = data.subarray(c * slotRows, c * slotRows + count);
      }
      try {
        work.push(views);
      } catch (error) {
        failure = error; // keep freeing slots, so that the reader never waits for ever
      }
    }
    ring.release();
  }
  return failure;
}

/** Reads the group's channels from the file opened again (loaded only on this path). */
async function readOwn(
  { recipe, channels }: { recipe: StreamRecipe; channels: number[] },
  work: GroupWork,
): Promise<void> {
  const { reopenRecordingStream } = await import("../io/recording_stream.ts");
  const stream = await reopenRecordingStream(recipe);
  await stream.read(channels, (chunk) => work.push(chunk));
}

scope.onmessage = async (event) => {
  const start = event.data;
  let work: GroupWork | undefined;
  let failure: unknown;
  try {
    work = new GroupWork(start);
  } catch (error) {
    failure = error;
  }
  if (start.reopen === undefined) {
    failure = drainRing(start, work) ?? failure;
  } else if (work !== undefined) {
    try {
      await readOwn(start.reopen, work);
    } catch (error) {
      failure = error;
    }
  }
  try {
    if (failure !== undefined) throw failure;
    const estimate = work!.accumulator.finish();
    const { checks } = start;
    if (checks === undefined) scope.postMessage({ estimate });
    else {
      scope.postMessage({
        estimate,
        warnings: checks.map((c, i) => work!.statistics[i].warnings(c)),
      });
    }
  } catch (error) {
    scope.postMessage({ error: postedError(error) });
  }
};
