import { describe, expect, test } from "vitest";
import { convertFrfForm, formOfResponseUnit, frfUnit } from "../../lib/frf/forms.ts";
import { assertClose } from "../helpers/assert_close.ts";
import { type Mode, receptance } from "../helpers/modal.ts";

const MODES: Mode[] = [{ frequencyHz: 30, damping: 0.03, residue: 1 }];
const f = new Float64Array(200).map((_, k) => 0.5 + k);
const x = { re: f.map((v) => receptance(MODES, v).re), im: f.map((v) => receptance(MODES, v).im) };

describe("FRF form conversion", () => {
  test("accelerance is −ω² times receptance and mobility jω times it", () => {
    // Ewins, Modal Testing, sec. 2.5: A/F = −ω²·X/F, V/F = iω·X/F.
    const a = convertFrfForm(x, f, "receptance", "accelerance");
    const v = convertFrfForm(x, f, "receptance", "mobility");
    const w = f.map((v) => 2 * Math.PI * v);
    assertClose(a.re, x.re.map((r, k) => -w[k] * w[k] * r), { relative: 1e-12, absolute: 0 });
    assertClose(a.im, x.im.map((r, k) => -w[k] * w[k] * r), { relative: 1e-12, absolute: 0 });
    assertClose(v.re, x.im.map((r, k) => -w[k] * r), { relative: 1e-12, absolute: 0 });
    assertClose(v.im, x.re.map((r, k) => w[k] * r), { relative: 1e-12, absolute: 0 });
  });

  test("conversions round-trip", () => {
    const a = convertFrfForm(x, f, "receptance", "accelerance");
    const back = convertFrfForm(
      convertFrfForm(a, f, "accelerance", "mobility"),
      f,
      "mobility",
      "receptance",
    );
    assertClose(back.re, x.re, { relative: 1e-12, absolute: 1e-18 });
    assertClose(back.im, x.im, { relative: 1e-12, absolute: 1e-18 });
  });

  test("dividing by jω at 0 Hz gives NaN, not a number", () => {
    const h = convertFrfForm(
      { re: new Float64Array([1]), im: new Float64Array([0]) },
      new Float64Array([0]),
      "accelerance",
      "receptance",
    );
    expect(Number.isNaN(h.re[0])).toBe(true);
  });

  test("the measured form follows from the SI unit only", () => {
    expect(formOfResponseUnit("m/s^2")).toBe("accelerance");
    expect(formOfResponseUnit("m/s")).toBe("mobility");
    expect(formOfResponseUnit("m")).toBe("receptance");
    expect(formOfResponseUnit("V")).toBeUndefined();
    expect(frfUnit("m/s", "N")).toBe("(m/s)/N");
  });
});
