/**
 * A ring of a few slots of doubles in shared memory between one producer
 * and one consumer in different threads (the CSV parse workers and the
 * reader, the reader and the spectral worker). The producer claims a free
 * slot, fills it and publishes how much it wrote with a flag; the consumer
 * takes slots in the order they were published and releases each when done.
 * Memory is the slots, whatever the speed of either side: a producer that
 * finds every slot full waits.
 *
 * Waiting is `Atomics.wait` (a worker, or a thread that may block) or
 * `Atomics.waitAsync` (a thread whose event loop must keep running, e.g. to
 * hear a worker fail).
 *
 * @module
 */

/** Control word: slots published so far. */
const PUBLISHED = 0;
/** Control word: slots released so far. */
const RELEASED = 1;
/** First of the per-slot words: count written, then flag. */
const SLOT_WORDS = 2;

/** What a ring is made of, to post to the other thread. */
export interface RingBuffers {
  readonly control: SharedArrayBuffer;
  readonly data: SharedArrayBuffer;
  readonly slots: number;
  readonly slotLength: number;
}

/** A slot taken by the consumer: its doubles, the count and the flag the producer published. */
export interface TakenSlot {
  readonly data: Float64Array;
  readonly count: number;
  readonly flag: number;
}

/**
 * One side of a shared ring; {@linkcode SharedRing.create} makes one,
 * {@linkcode SharedRing.attach} joins it from the other thread.
 *
 * @example
 * ```ts
 * import { SharedRing } from "./shared_ring.ts";
 * const producer = SharedRing.create(2, 3);
 * const consumer = SharedRing.attach(producer.buffers);
 * const slot = producer.claim()!;
 * slot.set([1, 2]);
 * producer.publish(2, 7);
 * const taken = consumer.take();
 * if (taken.count !== 2 || taken.flag !== 7 || taken.data[1] !== 2) throw new Error();
 * consumer.release();
 * ```
 */
export class SharedRing {
  /** The buffers, to post to the thread on the other side. */
  readonly buffers: RingBuffers;
  readonly #control: Int32Array;
  readonly #views: Float64Array[];
  #published = 0; // producer side: slots published by this side
  #taken = 0; // consumer side: slots taken by this side

  private constructor(buffers: RingBuffers) {
    this.buffers = buffers;
    this.#control = new Int32Array(buffers.control);
    this.#views = Array.from(
      { length: buffers.slots },
      (_, s) => new Float64Array(buffers.data, 8 * s * buffers.slotLength, buffers.slotLength),
    );
  }

  /**
   * A new ring of `slots` slots of `slotLength` doubles each.
   *
   * @throws {RangeError} for a slot count or length that is not a positive integer.
   */
  static create(slots: number, slotLength: number): SharedRing {
    if (!Number.isInteger(slots) || slots < 1 || !Number.isInteger(slotLength) || slotLength < 1) {
      throw new RangeError(
        `a ring needs a positive whole number of slots and doubles per slot, got ${slots} × ${slotLength}`,
      );
    }
    return new SharedRing({
      control: new SharedArrayBuffer(4 * (SLOT_WORDS + 2 * slots)),
      data: new SharedArrayBuffer(8 * slots * slotLength),
      slots,
      slotLength,
    });
  }

  /** The ring made by {@linkcode SharedRing.create} in another thread. */
  static attach(buffers: RingBuffers): SharedRing {
    return new SharedRing(buffers);
  }

  /**
   * Producer: the next slot to fill, once the consumer has released it;
   * `undefined` when it has not after `timeoutMs` (the consumer is gone).
   * Blocks the thread while it waits.
   */
  claim(timeoutMs = Infinity): Float64Array | undefined {
    const control = this.#control;
    const slots = this.buffers.slots;
    for (;;) {
      const released = Atomics.load(control, RELEASED);
      if (this.#published - released < slots) return this.#views[this.#published % slots];
      if (Atomics.wait(control, RELEASED, released, timeoutMs) === "timed-out") return undefined;
    }
  }

  /** Producer: hands the claimed slot over with the count written and a flag of the caller's. */
  publish(count: number, flag = 0): void {
    const control = this.#control;
    const slot = this.#published % this.buffers.slots;
    control[SLOT_WORDS + 2 * slot] = count;
    control[SLOT_WORDS + 2 * slot + 1] = flag;
    this.#published++;
    Atomics.store(control, PUBLISHED, this.#published); // orders the words above before it
    Atomics.notify(control, PUBLISHED);
  }

  /** Consumer: the next published slot, waiting for it (blocks the thread). */
  take(): TakenSlot {
    const control = this.#control;
    while (Atomics.load(control, PUBLISHED) === this.#taken) {
      Atomics.wait(control, PUBLISHED, this.#taken);
    }
    return this.#slotTaken();
  }

  /** Consumer: the next published slot if there is one, without waiting. */
  poll(): TakenSlot | undefined {
    return Atomics.load(this.#control, PUBLISHED) === this.#taken ? undefined : this.#slotTaken();
  }

  /** Consumer: the next published slot, waiting without blocking the event loop. */
  async takeAsync(): Promise<TakenSlot> {
    const control = this.#control;
    while (Atomics.load(control, PUBLISHED) === this.#taken) {
      const waiting = Atomics.waitAsync(control, PUBLISHED, this.#taken);
      if (waiting.async) await waiting.value;
    }
    return this.#slotTaken();
  }

  #slotTaken(): TakenSlot {
    const control = this.#control;
    const slot = this.#taken % this.buffers.slots;
    return {
      data: this.#views[slot],
      count: Atomics.load(control, SLOT_WORDS + 2 * slot),
      flag: Atomics.load(control, SLOT_WORDS + 2 * slot + 1),
    };
  }

  /** Consumer: gives the slot last taken back to the producer. */
  release(): void {
    this.#taken++;
    Atomics.store(this.#control, RELEASED, this.#taken);
    Atomics.notify(this.#control, RELEASED);
  }
}
