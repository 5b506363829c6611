/**
 * FRF forms and their conversion by jω (common practice; Ewins, Modal
 * Testing, 2nd ed., sec. 2.5): receptance X/F, mobility V/F = jω·X/F,
 * accelerance A/F = (jω)²·X/F = −ω²·X/F.
 *
 * The measured form follows from the response channel's unit: `m/s^2`
 * (acceleration), `m/s` (velocity) or `m` (displacement). Conversion needs
 * one of these SI units; any other unit can be analysed, but not converted.
 *
 * @module
 */
import { parseChoice } from "../choices.ts";
import type { ComplexSpectrum } from "./estimators.ts";

/**
 * The FRF forms, ordered by the power of jω relative to receptance.
 *
 * @example
 * ```ts
 * import { FRF_FORMS } from "./forms.ts";
 * if (FRF_FORMS.indexOf("accelerance") - FRF_FORMS.indexOf("receptance") !== 2) throw new Error(); // (jω)²
 * ```
 */
export const FRF_FORMS = ["receptance", "mobility", "accelerance"] as const;

/** One of {@linkcode FRF_FORMS}. */
export type FrfForm = typeof FRF_FORMS[number];

/**
 * Narrows a user-supplied string to an {@linkcode FrfForm}.
 *
 * @example
 * ```ts
 * import { parseFrfForm } from "./forms.ts";
 * if (parseFrfForm("mobility") !== "mobility") throw new Error();
 * ```
 */
export function parseFrfForm(name: string): FrfForm {
  return parseChoice(name, FRF_FORMS, "FRF form");
}

const RESPONSE_UNIT: Readonly<Record<FrfForm, string>> = {
  receptance: "m",
  mobility: "m/s",
  accelerance: "m/s^2",
};

/**
 * The form an FRF has when its response is in `unit`, or undefined for a
 * unit that is not SI displacement, velocity or acceleration.
 *
 * @example
 * ```ts
 * import { formOfResponseUnit } from "./forms.ts";
 * if (formOfResponseUnit("m/s^2") !== "accelerance") throw new Error();
 * if (formOfResponseUnit("g") !== undefined) throw new Error();
 * ```
 */
export function formOfResponseUnit(unit: string): FrfForm | undefined {
  const normalised = unit.trim().replace("²", "^2").replace("s2", "s^2");
  return FRF_FORMS.find((form) => RESPONSE_UNIT[form] === normalised);
}

/**
 * The unit of an FRF with a response in `responseUnit` per `inputUnit`.
 *
 * @example
 * ```ts
 * import { frfUnit } from "./forms.ts";
 * if (frfUnit("m/s^2", "N") !== "(m/s^2)/N") throw new Error();
 * if (frfUnit("m", "N") !== "m/N") throw new Error();
 * ```
 */
export function frfUnit(responseUnit: string, inputUnit: string): string {
  const wrap = (u: string) => (/^[A-Za-zµμ°Ω]+$/.test(u) ? u : `(${u})`);
  const top = responseUnit === "" ? "1" : wrap(responseUnit);
  return inputUnit === "" ? top : `${top}/${wrap(inputUnit)}`;
}

/**
 * The power of jω that turns receptance into the form: 0, 1 or 2.
 *
 * @example
 * ```ts
 * import { formPower } from "./forms.ts";
 * if (formPower("accelerance") !== 2) throw new Error();
 * ```
 */
export function formPower(form: FrfForm): number {
  return FRF_FORMS.indexOf(form);
}

/** The response unit of an FRF form. */
export function responseUnitOfForm(form: FrfForm): string {
  return RESPONSE_UNIT[form];
}

/**
 * Converts an FRF from one form to another by multiplying by (jω)^p, p the
 * difference of the forms' powers. Dividing by jω is undefined at 0 Hz;
 * such a line becomes NaN and the caller decides what to do with it.
 *
 * @example
 * ```ts
 * import { convertFrfForm } from "./forms.ts";
 * // Receptance 1 m/N at 1/(2π) Hz (ω = 1) is accelerance −1 (m/s²)/N.
 * const h = convertFrfForm({ re: new Float64Array([1]), im: new Float64Array([0]) },
 *   new Float64Array([1 / (2 * Math.PI)]), "receptance", "accelerance");
 * if (Math.abs(h.re[0] + 1) > 1e-12 || Math.abs(h.im[0]) > 1e-12) throw new Error();
 * ```
 */
export function convertFrfForm(
  h: ComplexSpectrum,
  frequencies: Float64Array,
  from: FrfForm,
  to: FrfForm,
): ComplexSpectrum {
  const power = formPower(to) - formPower(from);
  // (jω)^p = ω^p · j^p, and j^p cycles through 1, j, −1, −j.
  const [cr, ci] = [[1, 0], [0, 1], [-1, 0], [0, -1]][((power % 4) + 4) % 4];
  const re = new Float64Array(h.re.length);
  const im = new Float64Array(h.im.length);
  for (let k = 0; k < re.length; k++) {
    const magnitude = (2 * Math.PI * frequencies[k]) ** power;
    const m = Number.isFinite(magnitude) ? magnitude : NaN;
    re[k] = m * (h.re[k] * cr - h.im[k] * ci);
    im[k] = m * (h.re[k] * ci + h.im[k] * cr);
  }
  return { re, im };
}
