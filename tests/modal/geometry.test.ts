import { describe, expect, test } from "vitest";
import { parseGeometry } from "../../lib/modal/geometry.ts";
import { wireframe } from "../../lib/report/plot/wireframe.ts";

describe("test geometry for shape drawings", () => {
  test("points, lines, and the faults named with their line", () => {
    const g = parseGeometry("point,x,y,z,line_to\na,0,0,0,b\nb,1,0,0,c\nc,1,1,0,\n");
    expect(g.points.map((p) => p.point)).toEqual(["a", "b", "c"]);
    expect(g.lines).toEqual([["a", "b"], ["b", "c"]]);
    expect(() => parseGeometry("point,x,y\na,0,0\n", { file: "g.csv" })).toThrow(/missing z/);
    expect(() => parseGeometry("point,x,y,z\na,0,0,up\n", { file: "g.csv" })).toThrow(
      /g\.csv:2: z "up" is not a number/,
    );
    expect(() => parseGeometry("point,x,y,z,line_to\na,0,0,0,q\n")).toThrow(/goes to q/);
    expect(() => parseGeometry("point,x,y,z\na,0,0,0\na,1,0,0\n")).toThrow(/two positions/);
  });

  test("the drawing moves a point along its displacement, scaled to a quarter of the extent", () => {
    // Two points 1 apart on x; only the second moves, +1 in z: it must end 0.25 higher, i.e.
    // above the undeformed line's end, and the first must stay where it was.
    const svg = wireframe({
      title: "t",
      lines: [[0, 1]],
      points: [{ name: "a", at: [0, 0, 0], move: [0, 0, 0] }, {
        name: "b",
        at: [1, 0, 0],
        move: [0, 0, 1],
      }],
    });
    const coords = (cls: string) =>
      svg.match(
        new RegExp(
          `<line class="${cls}" x1="([\\d.]+)" y1="([\\d.]+)" x2="([\\d.]+)" y2="([\\d.]+)"`,
        ),
      )!
        .slice(1).map(Number);
    const [ux1, uy1, ux2, uy2] = coords("undeformed");
    const [dx1, dy1, dx2, dy2] = coords("deformed");
    expect([dx1, dy1]).toEqual([ux1, uy1]);
    expect(dx2).toBeCloseTo(ux2, 6);
    expect(dy2).toBeLessThan(uy2); // up on the page
  });
});
