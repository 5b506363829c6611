/**
 * Which change `quiver diff` names first: on a channel of many lines of few
 * degrees of freedom (a spectrogram's cells), chance alone makes some line
 * extreme; a change that holds for all lines at once (Bonferroni) is named
 * before it.
 */
import { expect, test } from "vitest";
import { beyondChance, rankChanges } from "../../lib/history/run_diff.ts";
import { spectralDiff } from "../../lib/history/run_diff_spectral.ts";
import { uniformGenerator } from "../helpers/random.ts";

const CONFIDENCE = 0.95;

/** A one-axis view: `columns` of power values with their degrees of freedom. */
function view(columns: { name: string; values: Float64Array; dof: number }[], n: number) {
  return {
    grid: [{
      name: "frequency_hz",
      unit: "Hz",
      values: Float64Array.from({ length: n }, (_, i) => i),
    }],
    statistics: "",
    columns: columns.map((c) => ({
      name: c.name,
      unit: "Pa^2/Hz",
      quantity: "power" as const,
      values: c.values,
      degreesOfFreedom: c.dof,
    })),
  };
}

/** Averages of `dof`/2 exponential values (a PSD estimate of unit density with `dof` degrees of freedom). */
function estimates(seed: number, n: number, dof: number, scale = 1): Float64Array {
  const u = uniformGenerator(seed);
  return Float64Array.from({ length: n }, () => {
    let sum = 0;
    for (let k = 0; k < dof / 2; k++) sum += -Math.log(1 - u());
    return (scale * sum) / (dof / 2);
  });
}

test("a 2-dof channel's chance extreme ranks below a real change that holds for all lines", () => {
  const n = 20000;
  // "cells": the same statistics in both runs, 2 degrees of freedom, a 10 % real drop so that the
  // channel counts as changed; "psd": 30 degrees of freedom, 12 dB less on lines 100-1599 (7.5 % of them, beyond chance).
  const cellsB = estimates(1, n, 2), cellsC = estimates(2, n, 2, 0.5);
  const psdB = estimates(3, n, 30), psdC = estimates(4, n, 30);
  for (let i = 100; i < 1600; i++) psdC[i] *= 10 ** (-12 / 10);
  const d = spectralDiff(
    view([{ name: "cells", values: cellsB, dof: 2 }, { name: "psd", values: psdB, dof: 30 }], n),
    view([{ name: "cells", values: cellsC, dof: 2 }, { name: "psd", values: psdC, dof: 30 }], n),
    CONFIDENCE,
    "s",
  );
  const [cells, psd] = d.channels;
  // Chance makes the cells' largest |change| (even among runs of three significant lines) larger
  // than the psd's real one: by |change| alone the cells would be named first.
  expect(Math.abs(cells.largest!.differenceDb)).toBeGreaterThan(
    Math.abs(psd.largest!.differenceDb),
  );
  // No 2-dof line holds at 1 − 0.05/20000: F(2, 2)'s quantile there is 1/2.5e-6 (65 dB).
  expect(cells.largest!.familywise).toBe(false);
  // The 12 dB drop holds: at 30 dof the Bonferroni interval is about ±7 dB (ln F ~ N(0, 4/30),
  // z = 4.6, normal approximation).
  expect(psd.largest!.familywise).toBe(true);
  expect(psd.largest!.at[0]).toBeGreaterThanOrEqual(100);
  expect(psd.largest!.at[0]).toBeLessThan(1600);
  expect(psd.largest!.differenceDb).toBeLessThan(-8);
  const ranked = rankChanges([{
    step: "s",
    channels: d.channels.map((ch) => ({
      ...ch,
      changed: beyondChance(ch.significant, ch.judged, CONFIDENCE),
    })),
  }]);
  // The halved cells count as changed, so both are ranked; the one that holds comes first.
  expect(ranked.map((r) => r.channel)).toEqual(["psd", "cells"]);
});

test("ranking: holding changes first, each group by |change|", () => {
  const ch = (channel: string, db: number, familywise: boolean) => ({
    channel,
    quantity: "power" as const,
    lines: 10,
    judged: 10,
    significant: 9,
    changed: true,
    meanDifferenceDb: db,
    largest: { at: [1], differenceDb: db, familywise },
  });
  const ranked = rankChanges([{
    step: "s",
    channels: [ch("a", -50, false), ch("b", 6, true), ch("c", -12, true), ch("d", 3, false)],
  }]);
  expect(ranked.map((r) => r.channel)).toEqual(["c", "b", "a", "d"]);
});
