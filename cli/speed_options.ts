/**
 * The shaft-speed options every rpm-based command shares (`orders`,
 * `spectrogram --against rpm`): declared once here, with their help text.
 *
 * @module
 */
import { z } from "npm:zod@4.6.7";
import type { RpmStepOptions, SpeedSource } from "../lib/orders/speed.ts";
import { integerOption, listOption, numberOption, type OptionSpec } from "./args.ts";

const positive = (what: string) =>
  numberOption().pipe(z.number().positive(`must be a positive number of ${what}`));

const text = { type: "string" } as const;

/** parseArgs spec of the speed and rpm-step options. */
export const SPEED_OPTIONS: OptionSpec = {
  tacho: text,
  ppr: text,
  "tacho-level": text,
  "tacho-hysteresis": text,
  "rpm-channel": text,
  "rpm-min": text,
  "rpm-max": text,
  "rpm-step": text,
};

/** zod shape of the speed and rpm-step options. */
export const speedOptionsShape = {
  tacho: z.string().min(1).optional(),
  ppr: integerOption().optional(),
  "tacho-level": numberOption().optional(),
  "tacho-hysteresis": positive("channel units").optional(),
  "rpm-channel": z.string().min(1).optional(),
  "rpm-min": positive("rpm").optional(),
  "rpm-max": positive("rpm").optional(),
  "rpm-step": positive("rpm").optional(),
};

/** Help lines of the speed options. */
export const SPEED_HELP = `Speed:
  --tacho CH           tacho pulse channel (analogue or TTL)
  --ppr N              pulses per revolution                   (with --tacho)
  --tacho-level L      switching level          (default: mid 2nd-98th percentile)
  --tacho-hysteresis H hysteresis width         (default: 20 % of that span)
  --rpm-channel CH     a channel holding rpm, instead of a tacho
  --rpm-min R, --rpm-max R   rpm range      (default: the recorded range, in steps)
  --rpm-step R         rpm between steps                           (default 50)`;

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

interface SpeedValues {
  tacho?: string;
  ppr?: number;
  "tacho-level"?: number;
  "tacho-hysteresis"?: number;
  "rpm-channel"?: string;
  "rpm-min"?: number;
  "rpm-max"?: number;
  "rpm-step"?: number;
}

/** The parsed options as the library's speed source and rpm steps. */
export function toSpeedOptions(values: SpeedValues): SpeedSource & RpmStepOptions {
  return {
    tacho: values.tacho,
    ppr: values.ppr,
    tachoLevel: values["tacho-level"],
    tachoHysteresis: values["tacho-hysteresis"],
    rpmChannel: values["rpm-channel"],
    rpmMin: values["rpm-min"],
    rpmMax: values["rpm-max"],
    rpmStep: values["rpm-step"],
  };
}

/** The speed source is one of tacho (with ppr) or rpm channel. */
export const oneSpeedSource = (v: SpeedValues): boolean =>
  (v.tacho === undefined) !== (v["rpm-channel"] === undefined);

/** --ppr comes with --tacho. */
export const pprWithTacho = (v: SpeedValues): boolean =>
  v.tacho === undefined || v.ppr !== undefined;
