import { describe, expect, test } from "vitest";
import { didYouMean, nearestName } from "../lib/nearest_name.ts";
import { channelIndices } from "../lib/io/recording.ts";
import { setupTransforms } from "../lib/io/channel_setup.ts";
import { curveFromColumns } from "../lib/compare/curve_input.ts";
import { modalDamping } from "../lib/modal/damping_analysis.ts";

// Levenshtein distance (Levenshtein 1966; the textbook example "kitten" → "sitting" is 3:
// two substitutions and one insertion, from memory). A slip is at most a third of the name.
describe("nearestName: one rule for every unknown name", () => {
  test("a slip of one or two edits finds the name; case does not count", () => {
    expect(nearestName("frnt_left", ["front_left", "rear_left"])).toBe("front_left"); // 1 insertion
    expect(nearestName("Front_Left", ["front_left", "rear_left"])).toBe("front_left"); // case only
    expect(nearestName("tachoo", ["tacho", "mic"])).toBe("tacho"); // 1 deletion
  });

  test("too far to be a slip: nothing offered", () => {
    // kitten → sitting is 3 edits, more than a third of 6 letters
    expect(nearestName("kitten", ["sitting"])).toBeUndefined();
    expect(nearestName("seat", ["front_left", "rear_left"])).toBeUndefined();
  });

  test("two names equally near: no guess (a first-found rule would name ch1)", () => {
    expect(nearestName("ch3", ["ch1", "ch2"])).toBeUndefined();
    expect(nearestName("ch3", ["ch1", "ch2", "ch3x"])).toBeUndefined();
    expect(nearestName("ch11", ["ch1", "ch2"])).toBe("ch1"); // 1 deletion against 2 edits
  });

  test("didYouMean is the piece inserted after the name", () => {
    expect(didYouMean("frnt_left", ["front_left"])).toBe(' (did you mean "front_left"?)');
    expect(didYouMean("zzz", ["front_left"])).toBe("");
  });
});

describe("every place a name is looked up suggests the nearest", () => {
  test("channels of a recording", () => {
    expect(() => channelIndices([{ name: "front_left" }, { name: "rear_left" }], ["frnt_left"]))
      .toThrow(
        'no channel named "frnt_left" (did you mean "front_left"?); the recording has "front_left", "rear_left"',
      );
    expect(() => channelIndices([{ name: "ch1" }, { name: "ch2" }], ["ch3"])).toThrow(
      /^no channel named "ch3"; the recording has "ch1", "ch2"$/,
    );
  });

  test("a set-up entry", () => {
    expect(() =>
      setupTransforms([{ name: "driver_ear", unit: "V" }], {
        channels: { driver_eer: { unit: "Pa", sensitivity_mv_per_unit: 50 } },
      })
    ).toThrow(
      'the set-up names channel "driver_eer" (did you mean "driver_ear"?), which the recording does not have (it has driver_ear)',
    );
  });

  test("a compare column and an FRF response", () => {
    const f = new Float64Array([1, 2, 3]);
    const columns = [
      { name: "frequency_hz", unit: "", values: f },
      { name: "seat_re", unit: "m/N", values: f },
      { name: "seat_im", unit: "m/N", values: f },
    ];
    expect(() => curveFromColumns(columns, { column: "sear" })).toThrow(
      'no column "sear" (did you mean "seat"?) (nor sear_re/_im, _mag, _mag_db); the table has frequency_hz, seat_re, seat_im',
    );
    const magnitude = new Float64Array(8).fill(1);
    const frf = {
      frequencies: new Float64Array(8).map((_, k) => k),
      channels: [{ name: "hub_z", unit: "m/N", magnitude }],
    };
    expect(() => modalDamping(frf, { channels: ["hub_y"] })).toThrow(
      'no FRF named "hub_y" (did you mean "hub_z"?); the table has hub_z',
    );
  });
});
