import { describe, expect, test } from "vitest";
import {
  applyChannelSetup,
  parseChannelSetup,
  setupTransforms,
} from "../../lib/io/channel_setup.ts";
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
      parseChannelSetup('{"channels": {"a": {"sensitivity_mv_per_unit": "10"}}}', "s.json")
    )
      .toThrow(/s\.json: channel set-up field channels\.a\.sensitivity_mv_per_unit/);
    expect(() => parseChannelSetup('{"channels": {"a": {"untis": "N"}}}', "s.json"))
      .toThrow(QuiverError);
    expect(() => parseChannelSetup('{"channels": {"a": {"role": "driver"}}}')).toThrow(/role/);
  });

  test("sensitivity and full scale outside their ranges are refused naming channel and value", () => {
    const setup = (field: string, value: string) =>
      parseChannelSetup(`{"channels": {"acc": {"unit": "m/s^2", "${field}": ${value}}}}`, "s.json");
    for (const value of ["0", "-1", "1e999", "-1e999", "9.9e-7", "1.01e6", "5e-324"]) {
      expect(() => setup("sensitivity_mv_per_unit", value), value).toThrow(
        new RegExp(
          `s\\.json: set-up channel "acc": sensitivity_mv_per_unit ${
            String(Number(value)).replace(/[.+]/g, "\\$&")
          } is out of range; quiver accepts 0\\.000001 … 1000000 mV per unit`,
        ),
      );
    }
    for (const value of ["0", "2e4", "1e999"]) {
      expect(() => setup("full_scale_volts", value), value).toThrow(
        /set-up channel "acc": full_scale_volts .* is out of range; quiver accepts 0\.000001 … 10000 V/,
      );
    }
    // Both ends of each range are accepted (the limits are where they are documented).
    for (const value of ["1e-6", "1e6"]) {
      expect(setup("sensitivity_mv_per_unit", value).channels.acc.sensitivity_mv_per_unit).toBe(
        Number(value),
      );
    }
    expect(setup("full_scale_volts", "1e4").channels.acc.full_scale_volts).toBe(1e4);
  });

  test("channel names are never looked up on an object's prototype", () => {
    const plain = setupTransforms(
      [{ name: "constructor", unit: "N" }, { name: "toString", unit: "Pa" }],
      parseChannelSetup('{"channels": {}}'),
    );
    expect(plain.map((t) => t.name)).toEqual(["constructor", "toString"]);
    // A hand-built set-up object (a plain object with a prototype) is read by own keys too:
    // looked up as obj[name], "constructor" would find Object (whose .name is "Object").
    const handMade = setupTransforms([{ name: "constructor", unit: "V" }], { channels: {} });
    expect(handMade[0]).toEqual({ name: "constructor", unit: "V", factor: 1 });
    // Callers index the parsed entries by channel name (calibrate): no prototype to find.
    expect(parseChannelSetup('{"channels": {}}').channels["constructor"]).toBeUndefined();
    // zod's record drops a "__proto__" key; the set-up keeps it as the channel it names.
    const proto = parseChannelSetup(
      '{"channels": {"__proto__": {"unit": "m/s^2", "sensitivity_mv_per_unit": 10}}}',
    );
    const [t] = setupTransforms([{ name: "__proto__", unit: "mV" }], proto);
    expect(t.unit).toBe("m/s^2");
    // 1 mV = 0.001 V → 0.001·1000/10 = 0.1 m/s^2 per mV.
    assertClose(t.factor, 0.1, { relative: 1e-12, absolute: 0 });
    expect(() => setupTransforms([{ name: "a", unit: "V" }], proto)).toThrow(
      /names channel "__proto__", which the recording does not have/,
    );
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
