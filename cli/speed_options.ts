/**
 * The shaft-speed options every rpm-based command shares (`orders`,
 * `spectrogram --against rpm`): declared once here, with their help text.
 *
 * @module
 */
import { z } from "npm:zod@4.6.7";
import { integerOption, listOption, numberOption } from "./args.ts";
import { option } from "./option_table.ts";

const positive = (what: string) =>
  numberOption().pipe(z.number().positive(`must be a positive number of ${what}`));

/** The shaft-speed and rpm-step options. */
export const SPEED_TABLE = {
  tacho: option(z.string().min(1), { value: "CH", help: "tacho pulse channel (analogue or TTL)" }),
  ppr: option(integerOption(), {
    value: "N",
    help:
      "pulses per revolution (with --tacho); with --missing-teeth,\nthe tooth positions of the full wheel (60 for a 60-2 wheel)",
  }),
  "missing-teeth": option(integerOption().pipe(z.number().int().min(1, "must be 1 or more")), {
    value: "M",
    help:
      "teeth missing from the wheel in one gap (2 for 60-2):\nthe gap marks each revolution and is never filled in",
  }),
  "tacho-level": option(numberOption(), {
    value: "L",
    help: "fixed switching level",
    default: "mid of the pulses' own envelope",
  }),
  "tacho-hysteresis": option(positive("channel units"), {
    value: "H",
    help: "fixed hysteresis width",
    default: "20 % of the envelope, at least 1 %\nof the 2nd-98th percentile span",
  }),
  "rpm-channel": option(z.string().min(1), {
    value: "CH",
    help: "a channel holding rpm, instead of a tacho",
  }),
  "rpm-min": option(positive("rpm"), {
    value: "R",
    help: "rpm range",
    default: "the recorded range, in steps",
    helpWith: "rpm-max",
  }),
  "rpm-max": option(positive("rpm"), { value: "R", help: "highest rpm step" }),
  "rpm-step": option(positive("rpm"), { value: "R", help: "rpm between steps", default: "50" }),
};

/** The heading of the speed options' help. */
export const SPEED_HEADING = "Speed";

/** A list of positive numbers such as orders, "2,4,6.5". */
export const positiveListOption = (what: string) =>
  listOption().pipe(z.array(z.string())).transform((list, context) => {
    const values = list.map(Number);
    if (values.some((v) => !(v > 0) || !Number.isFinite(v))) {
      context.addIssue({ code: "custom", message: `${what} must be positive numbers` });
      return z.NEVER;
    }
    return values;
  });

type SpeedValues = {
  [K in keyof typeof SPEED_TABLE]?: z.output<typeof SPEED_TABLE[K]["schema"]>;
};

/** The speed source is one of tacho (with ppr) or rpm channel. */
export const oneSpeedSource = (v: SpeedValues): boolean =>
  (v.tacho === undefined) !== (v["rpm-channel"] === undefined);

/** --ppr comes with --tacho. */
export const pprWithTacho = (v: SpeedValues): boolean =>
  v.tacho === undefined || v.ppr !== undefined;

/** --missing-teeth comes with --tacho. */
export const missingTeethWithTacho = (v: SpeedValues): boolean =>
  v["missing-teeth"] === undefined || v.tacho !== undefined;
