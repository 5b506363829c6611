/**
 * The vendored fft.js (lib/dsp/vendor/fft.js/) is the npm package's file but
 * for the two lines its README names, and transforms as the package does.
 */
import { readFileSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { expect, test } from "vitest";
import NpmFft from "fft.js";
import VendoredFft from "../../lib/dsp/vendor/fft.js/fft.js";

const ROOT = fileURLToPath(new URL("../../", import.meta.url));

test("the vendored copy is fft.js 4.0.4's lib/fft.js, made an ES module", () => {
  const npm = readFileSync(`${ROOT}node_modules/fft.js/lib/fft.js`, "utf8");
  const vendored = readFileSync(`${ROOT}lib/dsp/vendor/fft.js/fft.js`, "utf8");
  expect(JSON.parse(readFileSync(`${ROOT}node_modules/fft.js/package.json`, "utf8")).version)
    .toBe("4.0.4");
  expect(vendored).toBe(
    '// @ts-self-types="./fft.d.ts"\n' +
      npm.replace("\nmodule.exports = FFT;\n", "\nexport default FFT;\n"),
  );
});

test("it transforms as the package does, to the bit", () => {
  const n = 64;
  const data = new Float64Array(2 * n).map((_, i) => Math.sin(i * 0.37) + (i % 5) / 7);
  const a = new Float64Array(2 * n);
  const b = new Float64Array(2 * n);
  new NpmFft(n).transform(a, data);
  new VendoredFft(n).transform(b, data);
  expect(b).toEqual(a);
});
