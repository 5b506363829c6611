import { inflateSync } from "node:zlib";
import { describe, expect, test } from "vitest";
import { heatMap, mapColour } from "../../lib/report/plot/heat_map.ts";
import { crc32 } from "../../lib/report/png.ts";

/** CIE 1976 L* of an sRGB colour "rgb(r,g,b)": sRGB transfer (IEC 61966-2-1), Y from the
 * Rec. 709 primaries (0.2126, 0.7152, 0.0722), L* = 116·(Y)^(1/3) − 16 above (6/29)³ (CIE 15). */
function lightness(rgb: readonly number[]): number {
  const lin = (c: number) => {
    const v = c / 255;
    return v <= 0.04045 ? v / 12.92 : ((v + 0.055) / 1.055) ** 2.4;
  };
  const Y = 0.2126 * lin(rgb[0]) + 0.7152 * lin(rgb[1]) + 0.0722 * lin(rgb[2]);
  return Y > 216 / 24389 ? 116 * Math.cbrt(Y) - 16 : (24389 / 27) * Y;
}
const parseRgb = (css: string) => css.match(/\d+/g)!.map(Number);

/** The PNG inside a heat map's SVG, decoded to width, height and RGB rows from the top. */
function mapPixels(
  svg: string,
): { width: number; height: number; at(x: number, y: number): number[] } {
  const base64 = svg.match(/data:image\/png;base64,([A-Za-z0-9+/=]+)/)![1];
  const png = new Uint8Array(Buffer.from(base64, "base64"));
  const view = new DataView(png.buffer, png.byteOffset);
  // PNG (ISO/IEC 15948): 8-byte signature, then chunks of length, type, data, CRC.
  expect(Array.from(png.subarray(0, 8))).toEqual([137, 80, 78, 71, 13, 10, 26, 10]);
  let at = 8, width = 0, height = 0;
  const idat: Uint8Array[] = [];
  while (at < png.length) {
    const length = view.getUint32(at);
    const type = String.fromCharCode(...png.subarray(at + 4, at + 8));
    expect(view.getUint32(at + 8 + length), `CRC of ${type}`).toBe(
      crc32(png.subarray(at + 4, at + 8 + length)),
    );
    if (type === "IHDR") {
      width = view.getUint32(at + 8);
      height = view.getUint32(at + 12);
      expect(Array.from(png.subarray(at + 16, at + 21))).toEqual([8, 2, 0, 0, 0]);
    }
    if (type === "IDAT") idat.push(png.subarray(at + 8, at + 8 + length));
    at += 12 + length;
  }
  const raw = inflateSync(Buffer.concat(idat));
  expect(raw.length).toBe(height * (1 + 3 * width));
  return {
    width,
    height,
    at: (x, y) => {
      const row = y * (1 + 3 * width);
      expect(raw[row]).toBe(0); // filter "none"
      return Array.from(raw.subarray(row + 1 + 3 * x, row + 4 + 3 * x));
    },
  };
}

describe("colour maps", () => {
  test("the ramp's lightness rises steadily, so it reads in greyscale", () => {
    const L = Array.from({ length: 101 }, (_, i) => lightness(parseRgb(mapColour(i / 100))));
    for (let i = 1; i < L.length; i++) expect(L[i], `at ${i / 100}`).toBeGreaterThan(L[i - 1]);
    expect(L[100] - L[0]).toBeGreaterThan(70);
    // Perceptually even enough: no hundredth of the ramp changes L* by more than 3× the mean.
    const mean = (L[100] - L[0]) / 100;
    for (let i = 1; i < L.length; i++) expect(L[i] - L[i - 1]).toBeLessThan(3 * mean);
  });

  test("CRC-32 check value of the PNG chunks", () => {
    // The standard check value of CRC-32 (ISO 3309) for "123456789" (from memory; the
    // catalogue of parametrised CRC algorithms lists it as 0xCBF43926).
    expect(crc32(new TextEncoder().encode("123456789"))).toBe(0xcbf43926);
  });

  test("cells become pixels the right way up: highest row at the top, x to the right", () => {
    const svg = heatMap({
      title: "t",
      xLabel: "x",
      yLabel: "y",
      zLabel: "dB",
      x: [1, 2],
      y: [10, 20, 30],
      z: [[0, 25, 50], [50, 25, 0]],
      zDomain: [0, 50],
    });
    const image = mapPixels(svg);
    expect([image.width, image.height]).toEqual([2, 3]);
    const L = (x: number, y: number) => lightness(image.at(x, y));
    expect(L(0, 0)).toBeGreaterThan(L(0, 1)); // column 1, row 30 (top) holds 50
    expect(L(0, 1)).toBeGreaterThan(L(0, 2));
    expect(L(1, 2)).toBeGreaterThan(L(1, 0)); // column 2, row 10 (bottom) holds 50
    expect(image.at(0, 0)).toEqual(image.at(1, 2));
  });

  test("a grid wider than the image merges cells by their highest value: a one-cell peak stays", () => {
    const z = Array.from({ length: 1000 }, (_, i) => [i === 501 ? 60 : 0]);
    const svg = heatMap({
      title: "t",
      xLabel: "x",
      yLabel: "y",
      zLabel: "dB",
      x: z.map((_, i) => i),
      y: [0],
      z,
      zDomain: [0, 60],
    });
    const image = mapPixels(svg);
    expect(image.width).toBe(500); // 1000 cells, two per pixel
    const bright = Array.from({ length: 500 }, (_, i) => lightness(image.at(i, 0)) > 50);
    expect(bright.indexOf(true)).toBe(250);
    expect(bright.lastIndexOf(true)).toBe(250);
  });

  test("order lines are clipped to the map and labelled", () => {
    const x = [1000, 2000, 3000, 4000];
    const svg = heatMap({
      title: "t",
      xLabel: "rpm",
      yLabel: "Hz",
      zLabel: "dB",
      x,
      y: [0, 100, 200],
      z: x.map(() => [0, 1, 2]),
      lines: [{ name: "order 8", x, y: x.map((r) => (8 * r) / 60) }],
    });
    // Drawn as two guides either side of the ridge: each vertex pair's midpoint is the ridge.
    const guides = [...svg.matchAll(/<path class="guide" d="([^"]+)"/g)].map((m) =>
      m[1].match(/[ML][\d.]+,[\d.]+/g)!.map((p) => p.slice(1).split(",").map(Number))
    );
    expect(guides).toHaveLength(2);
    const points = guides[0].map((p, k) => p.map((v, j) => (v + guides[1][k][j]) / 2));
    // 8·rpm/60 reaches the top line (200 Hz) at 1500 rpm: two points, the second on the edge.
    expect(points).toHaveLength(2);
    const ys = points.map((p) => p[1]);
    expect(Math.min(...ys)).toBeGreaterThanOrEqual(34 - 0.1); // the plot's top margin (1-decimal px)
    // The guides are cut at the map's edges: they sit in a viewport of the map's rectangle.
    expect(svg).toMatch(/<svg class="guides" x="70\.0" y="34\.0"[^>]*overflow="hidden">/);
    expect(svg).toMatch(/>order 8<\/text>/);
  });
});
