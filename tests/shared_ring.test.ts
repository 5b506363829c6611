import { describe, expect, test } from "vitest";
import { SharedRing } from "../lib/shared_ring.ts";
import { postedError, thrownError } from "../lib/workers.ts";
import { QuiverError } from "../lib/errors.ts";

describe("a shared ring of slots", () => {
  test("hands slots over in order, with counts and flags, across the wrap-around", async () => {
    const producer = SharedRing.create(3, 4);
    const consumer = SharedRing.attach(producer.buffers);
    for (let round = 0; round < 10; round++) {
      const slot = producer.claim(0);
      expect(slot).toBeDefined();
      slot!.fill(round);
      producer.publish(round % 4, round % 2);
      const taken = round % 2 === 0 ? consumer.take() : await consumer.takeAsync();
      expect(taken.count).toBe(round % 4);
      expect(taken.flag).toBe(round % 2);
      expect(Array.from(taken.data)).toEqual([round, round, round, round]);
      consumer.release();
    }
  });

  test("a producer finds no slot while all are published and unreleased", () => {
    const producer = SharedRing.create(2, 1);
    const consumer = SharedRing.attach(producer.buffers);
    producer.claim(0)![0] = 1;
    producer.publish(1);
    producer.claim(0)![0] = 2;
    producer.publish(1);
    expect(producer.claim(5)).toBeUndefined(); // both full: it waits, then gives up
    expect(consumer.take().data[0]).toBe(1);
    consumer.release();
    const third = producer.claim(0);
    expect(third).toBeDefined();
    third![0] = 3;
    producer.publish(1);
    expect(consumer.take().data[0]).toBe(2); // the older slot still comes first
    consumer.release();
    expect(consumer.poll()?.data[0]).toBe(3); // published: no wait needed
    consumer.release();
    expect(consumer.poll()).toBeUndefined(); // nothing published
  });

  test("refuses a ring without slots or without room", () => {
    expect(() => SharedRing.create(0, 4)).toThrow(RangeError);
    expect(() => SharedRing.create(2, 0.5)).toThrow(RangeError);
  });
});

describe("errors across a worker boundary", () => {
  test("a QuiverError keeps its message, location and kind; built-in classes their class", () => {
    const original = new QuiverError("bad cell", { file: "r.csv", line: 9, column: 2 }, "usage");
    const again = thrownError(structuredClone(postedError(original)));
    expect(again).toBeInstanceOf(QuiverError);
    expect(again.message).toBe(original.message);
    expect((again as QuiverError).location).toEqual({ file: "r.csv", line: 9, column: 2 });
    expect((again as QuiverError).kind).toBe("usage");
    expect(thrownError(postedError(new RangeError("block")))).toBeInstanceOf(RangeError);
    expect(thrownError(postedError(new TypeError("t")))).toBeInstanceOf(TypeError);
    expect(thrownError(postedError("plain")).message).toBe("plain");
  });
});
