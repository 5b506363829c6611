import { describe, expect, test } from "vitest";
import {
  parseWindowName,
  windowGains,
  type WindowName,
  windowResponse,
  windowSamples,
} from "../../lib/dsp/windows.ts";
import { assertClose } from "../helpers/assert_close.ts";

const N = 4096;

describe("window figures of merit", () => {
  // Harris 1978, "On the use of windows for harmonic analysis with the DFT",
  // Table 1 (coherent gain, ENBW in bins, scallop loss in dB), printed to two
  // decimals. Values transcribed from memory of the table; the rectangular
  // and Hann rows agree with instrument manuals that quote it.
  const harrisTable: [WindowName, number, number, number][] = [
    ["rectangular", 1.0, 1.0, 3.92],
    ["hann", 0.5, 1.5, 1.42],
    // Table 1 lists 1.78 dB for Hamming's scallop loss (from memory); the
    // closed form below gives 1.752 dB for a0 = 0.54, so that row is checked
    // against the closed form only.
    ["hamming", 0.54, 1.36, NaN],
    ["blackman-harris", 0.36, 2.0, 0.83],
  ];
  for (const [name, cg, enbw, scallop] of harrisTable) {
    test(`${name} has Harris's coherent gain, ENBW and scallop loss`, () => {
      const g = windowGains(windowSamples(name, N));
      // Half a unit in the table's last printed digit.
      assertClose(g.coherentGain, cg, { relative: 0, absolute: 0.005 }, "coherent gain");
      assertClose(g.enbwBins, enbw, { relative: 0, absolute: 0.005 }, "ENBW");
      if (!Number.isNaN(scallop)) {
        assertClose(g.scallopLossDb, scallop, { relative: 0, absolute: 0.005 }, "scallop loss");
      }
    });
  }

  test("scallop loss equals the closed form of a two-term cosine window", () => {
    // Analytic: for a two-term window a₀ − a₁cos(2πn/N) and large N the
    // response half a bin off centre is a₀·sinc(½) + (a₁/2)·|sinc(−½) + sinc(3/2)|,
    // relative to a₀ at the centre (the Dirichlet kernel tends to sinc).
    const sinc = (x: number) => Math.sin(Math.PI * x) / (Math.PI * x);
    const closedForm = (a: number[]) => {
      let r = a[0] * sinc(0.5);
      for (let k = 1; k < a.length; k++) {
        r += (a[k] / 2) * Math.abs(sinc(0.5 - k) + sinc(0.5 + k));
      }
      return -20 * Math.log10(r / a[0]);
    };
    const cases: [WindowName, number[]][] = [
      ["hann", [0.5, 0.5]],
      ["hamming", [0.54, 0.46]],
    ];
    for (const [name, a] of cases) {
      const g = windowGains(windowSamples(name, N));
      assertClose(g.scallopLossDb, closedForm(a), { relative: 0, absolute: 1e-4 }, name);
    }
  });

  test("flattop is HFT95 with Heinzel's NENBW and flatness", () => {
    // Heinzel, Rüdiger & Schilling 2002, appendix D, HFT95: NENBW 3.8112 bins
    // (quoted with the coefficients); amplitude flatness 0.0044 dB (from memory).
    const w = windowSamples("flattop", N);
    const g = windowGains(w);
    assertClose(g.enbwBins, 3.8112, { relative: 0, absolute: 0.00005 }, "NENBW");
    let worst = 0;
    for (let offset = 0; offset <= 0.5; offset += 0.01) {
      worst = Math.max(worst, Math.abs(20 * Math.log10(windowResponse(w, offset))));
    }
    expect(worst).toBeLessThan(0.0045);
  });

  test("windows are periodic (DFT-even): w[n] = w[N − n]", () => {
    for (const name of ["hann", "hamming", "blackman-harris", "flattop"] as const) {
      const w = windowSamples(name, 64);
      for (let n = 1; n < 64; n++) {
        assertClose(w[n], w[64 - n], { relative: 0, absolute: 1e-15 }, `${name}[${n}]`);
      }
      assertClose(w[32], 1, { relative: 0, absolute: 1e-15 }, `${name} peak`);
    }
  });

  test("unknown window names are refused", () => {
    expect(() => parseWindowName("kaiser")).toThrow(RangeError);
  });
});
