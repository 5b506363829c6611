import { describe, expect, test } from "vitest";
import { applyChannelSetup, parseChannelSetup } from "../../lib/io/channel_setup.ts";
import type { Recording } from "../../lib/io/recording.ts";
import { QuiverError } from "../../lib/errors.ts";
import { assertClose } from "../helpers/assert_close.ts";

const csvRecording: Recording = {
  rate: 1000,
  startTime: 0,
  channels: [
    { name: "seat_rail_z", unit: "V", data: new Float64Array([0.102, -0.0204]) },
    { name: "hammer", unit: "mV", data: new Float64Array([2.25, 0]) },
    { name: "plain", unit: "", data: new Float64Array([1, 2]) },
  ],
};
const wavRecording: Recording = {
  rate: 48000,
  startTime: 0,
  channels: [{ name: "ch1", unit: "FS", data: new Float64Array([0.5, -0.25]) }],
};

describe("channel set-up", () => {
  test("sensitivity turns volts into engineering units: value = V·1000/(mV per unit)", () => {
    // Definition of transducer sensitivity (common practice): 10.2 mV/(m/s²) reads 0.102 V as 10 m/s².
    const setup = parseChannelSetup(JSON.stringify({
      channels: {
        seat_rail_z: { unit: "m/s^2", sensitivity_mv_per_unit: 10.2, role: "response" },
        hammer: { unit: "N", sensitivity_mv_per_unit: 2.25, role: "force" },
        plain: { unit: "m/s^2", input_unit: "V", sensitivity_mv_per_unit: 100 },
      },
    }));
    const rec = applyChannelSetup(csvRecording, setup);
    assertClose(rec.channels[0].data, [10, -2], { relative: 1e-12, absolute: 0 });
    expect(rec.channels[0].unit).toBe("m/s^2");
    expect(rec.channels[0].role).toBe("response");
    assertClose(rec.channels[1].data, [1, 0], { relative: 1e-12, absolute: 0 });
    assertClose(rec.channels[2].data, [10, 20], { relative: 1e-12, absolute: 0 });
  });

  test("WAV channels go through full-scale volts, then sensitivity, and can be renamed", () => {
    const setup = parseChannelSetup(JSON.stringify({
      channels: {
        ch1: {
          name: "driver_ear",
          unit: "Pa",
          full_scale_volts: 2,
          sensitivity_mv_per_unit: 50,
          role: "microphone",
        },
      },
    }));
    const rec = applyChannelSetup(wavRecording, setup);
    expect(rec.channels[0].name).toBe("driver_ear");
    assertClose(rec.channels[0].data, [20, -10], { relative: 1e-12, absolute: 0 });
  });

  const refusals: [string, unknown, Recording, RegExp][] = [
    ["an unknown channel", { channels: { nope: { unit: "N" } } }, csvRecording, /does not have/],
    [
      "a sensitivity without a unit",
      { channels: { hammer: { sensitivity_mv_per_unit: 2 } } },
      csvRecording,
      /needs the engineering unit/,
    ],
    [
      "a sensitivity on data that are not volts",
      { channels: { plain: { unit: "N", sensitivity_mv_per_unit: 2 } } },
      csvRecording,
      /needs voltage data/,
    ],
    [
      "a unit contradicting the header",
      { channels: { seat_rail_z: { unit: "m/s^2" } } },
      csvRecording,
      /contradicts/,
    ],
    [
      "a WAV sensitivity without full scale",
      { channels: { ch1: { unit: "Pa", sensitivity_mv_per_unit: 50 } } },
      wavRecording,
      /full_scale_volts/,
    ],
    [
      "a rename that collides",
      { channels: { hammer: { name: "plain" } } },
      csvRecording,
      /two channels are called "plain"/,
    ],
  ];
  for (const [label, json, rec, pattern] of refusals) {
    test(`refuses ${label}`, () => {
      expect(() =>
        applyChannelSetup(rec, parseChannelSetup(JSON.stringify(json), "s.json"), "s.json")
      )
        .toThrow(pattern);
    });
  }

  test("schema errors name the field", () => {
    expect(() =>
      parseChannelSetup('{"channels": {"a": {"sensitivity_mv_per_unit": -1}}}', "s.json")
    )
      .toThrow(/s\.json: channel set-up field channels\.a\.sensitivity_mv_per_unit/);
    expect(() => parseChannelSetup('{"channels": {"a": {"untis": "N"}}}', "s.json"))
      .toThrow(QuiverError);
    expect(() => parseChannelSetup('{"channels": {"a": {"role": "driver"}}}')).toThrow(/role/);
  });

  test("JSON syntax errors give line and column", () => {
    try {
      parseChannelSetup('{\n  "channels": {,}\n}', "s.json");
      expect.fail("accepted bad JSON");
    } catch (e) {
      expect(e).toBeInstanceOf(QuiverError);
      expect((e as QuiverError).location.line).toBe(2);
    }
  });
});
