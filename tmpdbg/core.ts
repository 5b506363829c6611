import { spectralEstimate } from "../lib/dsp/spectral_core.ts";
const n = 1 << 21;
const a = new Float64Array(n).map(() => Math.random() - 0.5),
  b = new Float64Array(n).map(() => Math.random() - 0.5);
for (let r = 0; r < 3; r++) {
  const t0 = performance.now();
  spectralEstimate([a, b], { rate: 51200, block: 8192 });
  const dt = (performance.now() - t0) / 1000;
  console.log((2 * n / dt).toExponential(3), "samples/s");
}
