/**
 * The campaign report: one self-contained HTML file (inline SVG and CSS, no
 * scripts, no network) with the targets first, then every result as plots
 * and tables, then the trace of what was produced from what. Each plot is
 * also written as a standalone SVG next to the report, under `figures/`.
 *
 * @module
 */
import { formatFixed, formatNumber } from "../format_number.ts";
import { lstat, mkdir } from "node:fs/promises";
import { join } from "node:path";
import { writeFileAtomic } from "../io/atomic_write.ts";
import { uniqueFileNames } from "../io/file_name.ts";
import { QuiverError } from "../errors.ts";
import { numericColumn, readResultFile, type ResultTable } from "../io/result_file.ts";
import { commonMetadata, resultMetadata } from "../io/result_metadata.ts";
import type { ColumnValues, TableColumn } from "../io/table.ts";
import type { Manifest } from "../plan/runner.ts";
import type { Plan } from "../plan/schema.ts";
import type { TargetOutcome } from "../plan/target_eval.ts";
import { limitAt } from "../compare/targets.ts";
import { escapeXml } from "./escape_xml.ts";
import { type BarPlot, barPlot } from "./plot/bar_plot.ts";
import { type ChartSpec, chartSpec } from "./plot/chart_spec.ts";
import { type HeatMap, heatMap } from "./plot/heat_map.ts";
import { type LinePlot, linePlot, type Series } from "./plot/line_plot.ts";
import { recordingsSection, VIEWS_STYLE } from "./time_history.ts";
import { shapeFigure } from "./shape_view.ts";
import { readFileSync } from "node:fs";
import { fileURLToPath } from "node:url";

type ResultJson = ResultTable;

interface Figure {
  readonly name: string;
  readonly svg: string;
  /**
   * The same picture laid out for a narrow screen ({@linkcode NARROW_WIDTH}
   * px, legend under the frame), shown instead of `svg` where `svg` would
   * shrink its text below 11 px.
   */
  readonly narrow?: string;
  /** For a line plot: its data for the interactive chart. */
  readonly chart?: ChartSpec;
  /** One of a set of small pictures, laid out side by side. */
  readonly small?: boolean;
  /** Markup in place of the plain SVG (a view with its own data: time_history.ts, shape_view.ts). */
  readonly html?: string;
}

/**
 * The width of a figure's narrow picture. Shown at least this wide up to a
 * 700 px window (the narrow layout's margins leave 666 px), its 11 px text
 * stays at 11 px or more.
 */
const NARROW_WIDTH = 600;

/** A line plot's static SVG (wide and narrow) and the data of its interactive chart. */
function lineFigure(plot: LinePlot): { svg: string; narrow?: string; chart: ChartSpec } {
  const wide = linePlot(plot);
  return {
    svg: wide,
    ...((plot.width ?? 960) > NARROW_WIDTH
      ? { narrow: linePlot({ ...plot, width: NARROW_WIDTH }) }
      : {}),
    chart: chartSpec(plot),
  };
}

/** A bar chart, wide and narrow. */
function barFigure(plot: BarPlot): { svg: string; narrow: string } {
  return { svg: barPlot(plot), narrow: barPlot({ ...plot, width: NARROW_WIDTH }) };
}

/** A colour map, wide and narrow. */
function mapFigure(plot: HeatMap): { svg: string; narrow: string } {
  return { svg: heatMap(plot), narrow: heatMap({ ...plot, width: NARROW_WIDTH }) };
}

interface Section {
  readonly heading: string;
  readonly note?: string;
  readonly figures: Figure[];
  readonly html?: string;
  /** The step's result could not be shown (the step failed or its result is unreadable). */
  readonly failed?: boolean;
}

// The reader gives NaN, never 0, for a value that was not finite (e.g. −∞ dB): plots skip it.
const numbers = (c: TableColumn<ColumnValues>): Float64Array =>
  c.values instanceof Float64Array ? c.values : Float64Array.from(c.values, Number);
const withUnit = (label: string, unit: string) => (unit === "" ? label : `${label} [${unit}]`);

/** A step's result, or what kept it from being read. */
async function readJson(path: string): Promise<ResultTable | QuiverError> {
  try {
    return await readResultFile(path);
  } catch (error) {
    if (error instanceof QuiverError) return error;
    throw error;
  }
}

function spectrumFigures(id: string, title: string, r: ResultJson): Figure[] {
  const [f, ...channels] = r.columns;
  const m = resultMetadata(r, "spectrum");
  const kind = m.kind;
  const fx = numbers(f);
  const series: Series[] = channels.map((c) => ({ name: c.name, x: fx, y: numbers(c) }));
  return [{
    name: `${id}_spectrum`,
    ...lineFigure({
      title: `${title}: ${kind}, df ${
        formatNumber(m.df_hz, 6)
      } Hz, ${m.averages} averages, ${m.window}`,
      x: { label: "Frequency [Hz]", log: true, domain: [Math.max(fx[1], 1), fx[fx.length - 1]] },
      // psd and power are powers (unit², 10 dB per decade); rms and peak amplitudes.
      y: {
        label: withUnit(kind.toUpperCase(), channels[0]?.unit ?? ""),
        log: true,
        power: kind === "psd" || kind === "power",
      },
      series,
    }),
  }];
}

function frfFigures(id: string, title: string, r: ResultJson, limitHz?: number): Figure[] {
  const m = resultMetadata(r, "frf");
  const all = numbers(r.columns[0]);
  // A hammer FRF is drawn up to the hammer's usable bandwidth: beyond it the force is too weak.
  let lines = all.length;
  if (limitHz !== undefined) { while (lines > 2 && all[lines - 1] > limitHz) lines--; }
  const f = all.subarray(0, lines);
  // Each response's columns by their exact names, from the responses the metadata lists.
  const part = (suffix: string) =>
    m.responses.flatMap((response) => {
      const column = numericColumn(r, `${response.name}_${suffix}`);
      return column === undefined ? [] : [{ name: response.name, column }];
    });
  const domain: [number, number] = [Math.max(f[0] || f[1], 1), f[f.length - 1]];
  const mags = part("mag");
  const plotOf = (parts: ReturnType<typeof part>) =>
    parts.map(({ name, column }) => ({ name, x: f, y: column.values.subarray(0, lines) }));
  const limited = limitHz !== undefined && lines < all.length
    ? `, shown up to the usable bandwidth ${formatNumber(limitHz, 4)} Hz`
    : "";
  return [
    {
      name: `${id}_magnitude`,
      ...lineFigure({
        title: `${title}: |H| (${m.estimator}, ${m.averages} averages${limited})`,
        x: { label: "Frequency [Hz]", log: true, domain },
        y: { label: withUnit("|H|", mags[0]?.column.unit ?? ""), log: true, power: false },
        series: plotOf(mags),
      }),
    },
    {
      name: `${id}_phase`,
      ...lineFigure({
        title: `${title}: phase`,
        x: { label: "Frequency [Hz]", log: true, domain },
        y: { label: "Phase [deg]", domain: [-180, 180] },
        series: plotOf(part("phase_deg")),
        height: 240,
      }),
    },
    {
      name: `${id}_coherence`,
      ...lineFigure({
        title: `${title}: ordinary coherence`,
        x: { label: "Frequency [Hz]", log: true, domain },
        y: { label: "Coherence γ² [-]", domain: [0, 1] },
        series: plotOf(part("coherence")),
        height: 240,
      }),
    },
  ];
}

/** Hits drawn one by one at most (the rest are counted in the note). */
const HITS_DRAWN = 24;

/**
 * A hammer test: the FRFs up to the usable bandwidth, the force
 * autospectrum with that limit marked, and each hit's force and first
 * response against time with its status, so a rejected hit is seen.
 */
async function hammerFigures(
  id: string,
  title: string,
  r: ResultJson,
  outDir: string,
): Promise<Figure[]> {
  const m = resultMetadata(r, "hammer");
  const limit = m.usable_bandwidth_hz ?? undefined;
  const figures = frfFigures(id, title, r, limit);
  const f = numbers(r.columns[0]);
  const force = numericColumn(r, "force_autospectrum");
  if (force !== undefined) {
    const positive = force.values.filter((v) => v > 0);
    const lo = positive.length > 0 ? positive.reduce((a, b) => Math.min(a, b)) : 1;
    const hi = positive.length > 0 ? positive.reduce((a, b) => Math.max(a, b)) : 1;
    const series: Series[] = [{ name: "force autospectrum", x: f, y: force.values }];
    if (limit !== undefined) {
      series.push({
        name: `usable bandwidth ${formatNumber(limit, 4)} Hz (${
          m.usable_bandwidth_drop_db ?? 20
        } dB down)`,
        // Two points a hair apart: a vertical line that the interactive chart's shared x axis keeps.
        x: [limit, limit * (1 + 1e-5)],
        y: [lo, hi],
        dashed: true,
      });
    }
    figures.push({
      name: `${id}_force`,
      ...lineFigure({
        title: `${title}: force autospectrum of the accepted hits`,
        x: {
          label: "Frequency [Hz]",
          log: true,
          domain: [Math.max(f[0] || f[1], 1), f[f.length - 1]],
        },
        y: { label: withUnit("Gff", force.unit), log: true },
        series,
        height: 280,
      }),
    });
  }
  const records = await readJson(join(outDir, `${id}_records.json`));
  if (!(records instanceof QuiverError)) {
    const meta = resultMetadata(records, "hammer_records");
    const t = numbers(records.columns[0]);
    const peakNormalised = (values: Float64Array) => {
      let peak = 0;
      for (const v of values) if (Math.abs(v) > peak) peak = Math.abs(v);
      return peak > 0 ? values.map((v) => v / peak) : values;
    };
    for (const hit of meta.hits.slice(0, HITS_DRAWN)) {
      const forceColumn = numericColumn(records, `hit_${hit.hit}_force`);
      const response = numericColumn(records, `hit_${hit.hit}_response`);
      if (forceColumn === undefined || response === undefined) continue;
      figures.push({
        name: `${id}_hit_${hit.hit}`,
        small: true,
        ...lineFigure({
          title: `Hit ${hit.hit}: ${hit.status}${
            hit.reason !== null ? ` (${hit.reason})` : ""
          }; force and response, each to its own peak`,
          x: { label: "Time from trigger [s]" },
          y: { label: "Normalised [-]", domain: [-1.1, 1.1] },
          series: [
            {
              name: `${meta.force.name} [${meta.force.unit}]`,
              x: t,
              y: peakNormalised(forceColumn.values),
            },
            {
              name: `${meta.response.name} [${meta.response.unit}]`,
              x: t,
              y: peakNormalised(response.values),
            },
          ],
          width: NARROW_WIDTH,
          height: 220,
        }),
      });
    }
  }
  return figures;
}

/**
 * An FRF matrix: |H| of each output against every input, the multiple
 * coherence of each output beside it, and, when the plan wrote them, the
 * principal components of the inputs.
 */
async function frfMatrixFigures(
  id: string,
  title: string,
  r: ResultJson,
  outDir: string,
): Promise<Figure[]> {
  const m = resultMetadata(r, "frf_matrix");
  const f = numbers(r.columns[0]);
  const domain: [number, number] = [Math.max(f[0] || f[1], 1), f[f.length - 1]];
  const column = (name: string) => {
    const c = numericColumn(r, name);
    if (c === undefined) {
      throw new QuiverError(`no column "${name}" in the FRF matrix`, { file: r.file });
    }
    return c;
  };
  const figures: Figure[] = m.outputs.map((o) => {
    const series = m.inputs.map((x) => ({
      name: `${o.name}/${x.name}`,
      x: f,
      y: column(`${o.name}/${x.name}_mag`).values,
    }));
    return {
      name: `${id}_${o.name}_matrix`,
      ...lineFigure({
        title:
          `${title}: |H| of ${o.name} per input (h1, ${m.inputs.length} inputs, ${m.averages} averages)`,
        x: { label: "Frequency [Hz]", log: true, domain },
        y: {
          label: withUnit("|H|", column(`${o.name}/${m.inputs[0].name}_mag`).unit),
          log: true,
          power: false,
        },
        series,
      }),
    };
  });
  figures.push({
    name: `${id}_multiple_coherence`,
    ...lineFigure({
      title: `${title}: multiple coherence (share of each output the inputs explain together)`,
      x: { label: "Frequency [Hz]", log: true, domain },
      y: { label: "Multiple coherence γ² [-]", domain: [0, 1] },
      series: m.outputs.map((o) => ({
        name: o.name,
        x: f,
        y: column(`${o.name}_multiple_coherence`).values,
      })),
      height: 240,
    }),
  });
  const principal = await readJson(join(outDir, `${id}_principal.json`));
  if (!(principal instanceof QuiverError)) {
    const pcs = m.inputs.map((_, k) => numericColumn(principal, `pc${k + 1}`));
    figures.push({
      name: `${id}_principal`,
      ...lineFigure({
        title:
          `${title}: principal components of the inputs (eigenvalues of Gxx; as many above the floor as independent sources)`,
        x: { label: "Frequency [Hz]", log: true, domain },
        y: { label: withUnit("Eigenvalue", pcs[0]?.unit ?? ""), log: true },
        series: pcs.flatMap((c, k) =>
          c === undefined ? [] : [{ name: `pc${k + 1}`, x: f, y: c.values }]
        ),
      }),
    });
  }
  return figures;
}

/**
 * Transfer paths: each path's contribution overlaid on the measured target
 * and the paths' sum, per-band levels when the plan wrote them, and the
 * ranking of the paths over the analysed range and per octave.
 */
async function pathsSection(
  id: string,
  title: string,
  r: ResultJson,
  outDir: string,
): Promise<{ figures: Figure[]; html: string }> {
  const m = resultMetadata(r, "paths");
  const f = numbers(r.columns[0]);
  const domain: [number, number] = [Math.max(f[0] || f[1], 1), f[f.length - 1]];
  const column = (name: string) => {
    const c = numericColumn(r, name);
    if (c === undefined) {
      throw new QuiverError(`no column "${name}" in the paths result`, { file: r.file });
    }
    return c;
  };
  // Ranked: the largest path over the analysed range first.
  const order = m.ranking[0]?.paths.map((p) => p.name) ?? m.paths.map((p) => p.name);
  const unit = column("target_measured").unit;
  const figures: Figure[] = [{
    name: `${id}_contributions`,
    ...lineFigure({
      title: `${title}: contributions at ${m.target.name} (${m.method}), ranked`,
      x: { label: "Frequency [Hz]", log: true, domain },
      y: { label: withUnit("Contribution", unit), log: true, power: false },
      series: [
        ...order.map((name) => ({ name, x: f, y: column(`${name}_contribution`).values })),
        { name: "sum of paths", x: f, y: column("sum_of_paths").values, dashed: true },
        {
          name: `${m.target.name} measured`,
          x: f,
          y: column("target_measured").values,
          dashed: true,
        },
      ],
    }),
  }];
  const bands = await readJson(join(outDir, `${id}_bands.json`));
  if (!(bands instanceof QuiverError)) {
    const nominal = numericColumn(bands, "band_hz");
    const groups = [...order.map((n) => `${n}_level`), "sum_of_paths_level", "target_level"]
      .flatMap((name) => {
        const c = numericColumn(bands, name);
        return c === undefined ? [] : [{ name: name.replace(/_level$/, ""), values: c.values }];
      });
    if (nominal !== undefined && groups.length > 0) {
      figures.push({
        name: `${id}_bands`,
        ...barFigure({
          title: `${title}: per-band contributions (${m.level_unit})`,
          labels: Array.from(nominal.values, (v) => formatNumber(v, 4)),
          groups,
          xLabel: "Band nominal frequency [Hz]",
          yLabel: withUnit("Level", m.level_unit),
        }),
      });
    }
  }
  const rows = m.ranking.map((band) =>
    `<tr><td>${escapeXml(band.band)}</td><td>${
      band.paths.map((p) =>
        `${escapeXml(p.name)} ${formatFixed(p.level_db, 1)} (${formatFixed(p.share_percent, 0)} %)`
      ).join(", ")
    }</td></tr>`
  ).join("");
  const html = `<table><caption>Paths ranked by energy (${
    escapeXml(m.level_unit)
  }; share of the paths' total)</caption><thead><tr><th>Band</th><th>Paths, largest first</th></tr></thead><tbody>${rows}</tbody></table>`;
  return { figures, html };
}

function modeTable(r: ResultJson): string {
  const modes = resultMetadata(r, "damping").modes;
  const rows = modes.map((m) =>
    `<tr><td>${escapeXml(m.channel)}</td><td>${escapeXml(m.mode)}</td><td>${
      formatFixed(m.frequencyHz, 2)
    }</td><td>${formatFixed(m.dampingRatio === null ? null : 100 * m.dampingRatio, 2)}</td><td>${
      m.halfPower !== undefined
        ? formatFixed(
          m.halfPower.dampingRatio === null ? null : 100 * m.halfPower.dampingRatio,
          2,
        )
        : "–"
    }</td><td>${formatFixed(m.qFactor, 1)}</td><td>${escapeXml(m.method)}</td><td>${
      escapeXml(Array.isArray(m.flags) ? m.flags.join(", ") : m.flags)
    }</td></tr>`
  ).join("\n");
  return `<table><thead><tr><th>Channel</th><th>Mode</th><th>Frequency [Hz]</th><th>Damping [%]</th><th>Half-power damping [%]</th><th>Q</th><th>Primary</th><th>Flags</th></tr></thead><tbody>${rows}</tbody></table>`;
}

/** A limit-curve target of the plan with its outcome, for drawing on its analysis's chart. */
interface CurveLimit {
  readonly id: string;
  readonly channel: string;
  readonly points: readonly (readonly [number, number])[];
  readonly outcome?: TargetOutcome;
}

function bandFigures(
  id: string,
  title: string,
  r: ResultJson,
  limits: readonly CurveLimit[] = [],
): Figure[] {
  const m = resultMetadata(r, "bands");
  const nominal = r.columns.find((c) => c.name === "nominal_hz")!;
  const centre = numbers(r.columns[0]);
  const channels = r.columns.slice(4);
  // Each limit curve at every band's centre (null outside its range), and the bands that fail.
  const drawn = limits.filter((l) => channels.some((c) => c.name === l.channel)).map((l) => {
    const failed = new Set(
      l.outcome?.status === "checked" ? (l.outcome.failing ?? []).map((x) => x.atHz) : [],
    );
    return {
      name: `limit ${l.id}`,
      group: l.channel,
      values: Array.from(centre, (f) => limitAt(l.points, f) ?? null),
      failing: Array.from(centre, (f) => failed.has(f)),
    };
  });
  return [{
    name: `${id}_bands`,
    ...barFigure({
      title: `${title}: 1/${m.fraction}-octave bands, ${m.weighting}-weighted${
        drawn.some((l) => l.failing.some((f) => f))
          ? "; bands over the limit hatched and marked"
          : ""
      }`,
      labels: Array.from(numbers(nominal), (v) => formatNumber(v, 4)),
      groups: channels.map((c) => ({ name: c.name, values: numbers(c) })),
      xLabel: "Band nominal frequency [Hz]",
      yLabel: withUnit("Level", channels[0]?.unit ?? ""),
      limits: drawn,
    }),
  }];
}

function levelFigures(id: string, title: string, r: ResultJson): Figure[] {
  const m = resultMetadata(r, "level");
  const t = numbers(r.columns[0]);
  return [{
    name: `${id}_level`,
    ...lineFigure({
      title: `${title}: ${
        m.weighting === "per channel" ? "weighting per channel" : `${m.weighting}-weighted`
      }, ${m.time_weighting} time weighting`,
      x: { label: "Time [s]" },
      y: { label: withUnit("Level", r.columns[1]?.unit ?? "") },
      series: r.columns.slice(1).map((c) => ({ name: c.name, x: t, y: numbers(c) })),
    }),
  }];
}

/**
 * One colour map per channel of a tidy spectrogram: time or rpm across,
 * frequency up, level as colour; over an rpm map, the order lines the
 * analysis names (f = k·rpm/60).
 */
function spectrogramFigures(id: string, title: string, r: ResultJson): Figure[] {
  const m = resultMetadata(r, "spectrogram");
  const across = numbers(r.columns[0]);
  const frequency = numbers(r.columns[1]);
  const againstRpm = m.against === "rpm";
  const lines = across.lastIndexOf(across[0]) + 1; // rows of the first frame
  const frames = lines === 0 ? 0 : across.length / lines;
  const x = Array.from({ length: frames }, (_, j) => across[j * lines]);
  const y = Array.from(frequency.subarray(0, lines));
  const amplitude = m.kind === "rms" || m.kind === "peak";
  const orderLines = againstRpm ? m.order_lines ?? [] : [];
  return r.columns.slice(2).map((c) => {
    const v = numbers(c);
    const inDb = m.db;
    const z = x.map((_, j) =>
      v.slice(j * lines, (j + 1) * lines).map((value) =>
        inDb ? value : (amplitude ? 20 : 10) * Math.log10(value)
      )
    );
    return {
      name: `${id}_${c.name}_spectrogram`,
      ...mapFigure({
        title: `${title}: ${c.name}`,
        xLabel: againstRpm ? "Speed [rpm]" : "Time [s]",
        yLabel: "Frequency [Hz]",
        zLabel: inDb ? c.unit : `dB re 1 ${c.unit}`,
        x,
        y,
        z,
        lines: orderLines.map((k) => ({
          name: `order ${k}`,
          x,
          y: x.map((rpm) => (k * rpm) / 60),
        })),
      }),
    };
  });
}

async function orderFigures(
  id: string,
  title: string,
  r: ResultJson,
  outDir: string,
): Promise<Figure[]> {
  const m = resultMetadata(r, "orders");
  const rpm = numbers(r.columns[0]);
  const cuts = r.columns.slice(1);
  const figures: Figure[] = [{
    name: `${id}_cuts`,
    ...lineFigure({
      title: `${title}: order cuts and overall (${m.amplitude}, ${m.method} method${
        m.weighting !== "Z" ? `, ${m.weighting}-weighted` : ""
      })`,
      x: { label: "Speed [rpm]" },
      // Levels in dB on a linear axis; amplitudes on a logarithmic one.
      y: m.db
        ? { label: withUnit("Level", cuts[0]?.unit ?? "") }
        : { label: withUnit("Amplitude", cuts[0]?.unit ?? ""), log: true, power: false },
      series: cuts.map((c) => ({
        name: c.name,
        x: rpm,
        y: numbers(c),
        dashed: c.name.endsWith("_overall"),
      })),
    }),
  }];
  const map = await readJson(join(outDir, `${id}_map.json`));
  if (!(map instanceof QuiverError) && map.columns.length >= 3) {
    const mr = numbers(map.columns[0]);
    const axis = numbers(map.columns[1]);
    const values = numbers(map.columns[2]);
    const steps = [...new Set(mr)];
    const perStep = axis.length / steps.length;
    const y = Array.from(axis.subarray(0, perStep));
    const z = steps.map((_, i) =>
      values.slice(i * perStep, (i + 1) * perStep).map((v) => 20 * Math.log10(v))
    );
    const unit = map.columns[2].unit;
    figures.push({
      name: `${id}_map`,
      ...mapFigure({
        title: `${title}: ${map.columns[2].name}, level against speed and ${
          map.columns[1].name === "order" ? "order" : "frequency"
        }`,
        xLabel: "Speed [rpm]",
        yLabel: map.columns[1].name === "order" ? "Order [-]" : "Frequency [Hz]",
        zLabel: `dB re 1 ${unit}`,
        x: steps,
        y,
        z,
      }),
    });
  }
  return figures;
}

/** A modal fit: the mode table, the stability chart, and measured against synthesised FRFs. */
async function modalSection(
  id: string,
  title: string,
  r: ResultJson,
  outDir: string,
): Promise<{ figures: Figure[]; html: string }> {
  const m = resultMetadata(r, "modal");
  const rows = m.modes.map((mode) =>
    `<tr><td>${escapeXml(mode.mode)}</td><td>${formatFixed(mode.frequencyHz, 2)}</td><td>${
      formatFixed(100 * mode.dampingRatio, 2)
    }</td><td>${formatFixed(mode.mpc, 3)}</td><td>${escapeXml(mode.flags.join(", "))}</td></tr>`
  ).join("\n");
  const html =
    `<table><thead><tr><th>Mode</th><th>Frequency [Hz]</th><th>Damping [%]</th><th>MPC</th><th>Flags</th></tr></thead><tbody>${rows}</tbody></table>`;
  const figures: Figure[] = [];
  const stability = await readJson(join(outDir, `${id}_stability.json`));
  if (!(stability instanceof QuiverError)) {
    const [order, hz, , sf, sd, ss] = stability.columns.map(numbers);
    const pick = (test: (k: number) => boolean) => {
      const x: number[] = [], y: number[] = [];
      for (let k = 0; k < order.length; k++) {
        if (test(k)) {
          x.push(hz[k]);
          y.push(order[k]);
        }
      }
      return { x, y };
    };
    const all = (k: number) => sf[k] === 1 && sd[k] === 1 && ss[k] === 1;
    figures.push({
      name: `${id}_stability`,
      ...lineFigure({
        title: `${title}: stability over model orders`,
        x: { label: "Frequency [Hz]" },
        y: { label: "Model order [-]" },
        series: [
          { name: "stable (f, ζ, shape)", markers: true, ...pick(all) },
          { name: "stable in f only", markers: true, ...pick((k) => sf[k] === 1 && !all(k)) },
          { name: "not stable", markers: true, ...pick((k) => sf[k] !== 1) },
        ],
      }),
    });
  }
  const synth = await readJson(join(outDir, `${id}_synth.json`));
  if (!(synth instanceof QuiverError)) {
    const f = numbers(synth.columns[0]);
    const series: Series[] = [];
    // Up to three points: measured solid, synthesised dashed, |H| from re and im.
    for (let d = 0; d < Math.min(3, m.dofs.length); d++) {
      const [mr, mi, sr, si] = synth.columns.slice(1 + 4 * d, 5 + 4 * d).map(numbers);
      const name = m.dofs[d].point + (m.dofs[d].direction === "" ? "" : ` ${m.dofs[d].direction}`);
      series.push({ name: `${name} measured`, x: f, y: mr.map((v, k) => Math.hypot(v, mi[k])) });
      series.push({
        name: `${name} synthesised`,
        x: f,
        y: sr.map((v, k) => Math.hypot(v, si[k])),
        dashed: true,
      });
    }
    figures.push({
      name: `${id}_synthesis`,
      ...lineFigure({
        title: `${title}: measured and synthesised receptance`,
        x: { label: "Frequency [Hz]" },
        y: { label: withUnit("|H|", synth.columns[1]?.unit ?? ""), log: true, power: false },
        series,
      }),
    });
  }
  const shapes = m.geometry !== undefined
    ? await readJson(join(outDir, `${id}_shapes.json`))
    : undefined;
  if (m.geometry !== undefined && shapes !== undefined && !(shapes instanceof QuiverError)) {
    const geometry = m.geometry;
    const [mode] = [shapes.columns[0]].map(numbers);
    const point = shapes.columns[1].values, direction = shapes.columns[2].values;
    const re = numbers(shapes.columns[3]), im = numbers(shapes.columns[4]);
    const index = new Map(geometry.points.map((p, i) => [p.point, i]));
    for (const fitted of m.modes) {
      const { figure } = shapeFigure(id, fitted, geometry, index, {
        mode,
        point,
        direction,
        re,
        im,
      });
      figures.push(figure);
    }
  }
  return { figures, html };
}

/** A shape correlation: the MAC matrix as a colour grid with its values, and the pairs. */
function macSection(id: string, title: string, r: ResultJson): { figures: Figure[]; html: string } {
  const m = resultMetadata(r, "mac");
  const [testMode, simMode, mac] = r.columns.map(numbers);
  const tests = [...new Set(testMode)].sort((a, b) => a - b);
  const sims = [...new Set(simMode)].sort((a, b) => a - b);
  const z = sims.map((s) =>
    Float64Array.from(tests, (t) => {
      for (let k = 0; k < mac.length; k++) if (testMode[k] === t && simMode[k] === s) return mac[k];
      return NaN;
    })
  );
  const rows = m.pairs.map((p) =>
    `<tr><td>${escapeXml(p.test_mode)}</td><td>${escapeXml(p.simulation_mode)}</td><td>${
      formatFixed(p.test_hz, 2)
    }</td><td>${formatFixed(p.simulation_hz, 2)}</td><td>${
      formatFixed(p.shift_percent, 2)
    }</td><td>${formatFixed(p.mac, 3)}</td></tr>`
  ).join("\n");
  return {
    figures: [{
      name: `${id}_mac`,
      ...mapFigure({
        title: `${title}: MAC, test against simulation (${m.dofs_used} points)`,
        xLabel: "Simulation mode",
        yLabel: "Test mode",
        zLabel: "MAC [-]",
        x: sims,
        y: tests,
        z,
        zDomain: [0, 1],
        values: true,
      }),
    }],
    html:
      `<table><thead><tr><th>Test mode</th><th>Simulation mode</th><th>Test [Hz]</th><th>Simulation [Hz]</th><th>Shift [%]</th><th>MAC</th></tr></thead><tbody>${rows}</tbody></table>`,
  };
}

function comparisonFigures(
  id: string,
  title: string,
  r: ResultJson,
): { figures: Figure[]; html: string } {
  const f = numbers(r.columns[0]);
  const m = resultMetadata(r, "compare");

  const figures: Figure[] = [
    {
      name: `${id}_overlay`,
      ...lineFigure({
        title: `${title}: test and simulation (FRAC ${formatFixed(m.frac, 3)})`,
        x: { label: "Frequency [Hz]", log: true },
        y: { label: withUnit("Magnitude", r.columns[1].unit), log: true, power: false },
        series: [
          { name: "test", x: f, y: numbers(r.columns[1]) },
          { name: "simulation", x: f, y: numbers(r.columns[2]), dashed: true },
        ],
      }),
    },
    {
      name: `${id}_difference`,
      ...lineFigure({
        title: `${title}: simulation − test`,
        x: { label: "Frequency [Hz]", log: true },
        y: { label: "Difference [dB]" },
        series: [{ name: "difference", x: f, y: numbers(r.columns[3]) }],
        height: 240,
      }),
    },
  ];
  const bands = m.bands ?? [];
  if (bands.length > 0) {
    figures.push({
      name: `${id}_bands`,
      ...barFigure({
        title: `${title}: simulation − test per band`,
        labels: bands.map((b) => formatNumber(b.nominal_hz, 4)),
        groups: [{
          name: "simulation − test",
          values: new Float64Array(bands.map((b) => b.difference_db ?? NaN)),
        }],
        xLabel: "Band nominal frequency [Hz]",
        yLabel: "Difference [dB]",
        baseline: 0,
        height: 280,
      }),
    });
  }
  const rows = m.peaks.map((p) =>
    `<tr><td>${formatFixed(p.test_hz, 2)}</td><td>${formatFixed(p.simulation_hz, 2)}</td><td>${
      formatFixed(p.shift_percent, 2)
    }</td><td>${formatFixed(p.level_difference_db, 2)}</td></tr>`
  ).join("");
  const html = `<p>FRAC ${formatFixed(m.frac, 4)} (on ${
    escapeXml(m.frac_on)
  } data), common grid of ${escapeXml(m.grid.lines)} lines from the ${
    escapeXml(m.grid.from)
  } curve.</p><table><thead><tr><th>Test peak [Hz]</th><th>Simulation peak [Hz]</th><th>Shift [%]</th><th>Level difference [dB]</th></tr></thead><tbody>${rows}</tbody></table>`;
  return { figures, html };
}

function targetTable(targets: readonly TargetOutcome[]): string {
  if (targets.length === 0) return "<p>The plan sets no targets.</p>";
  const rows = targets.map((t) => {
    if (t.status === "not_checked") {
      return `<tr class="unchecked"><td>${escapeXml(t.id)}</td><td>${
        escapeXml(t.description)
      }</td><td colspan="3">not checked: ${
        escapeXml(t.reason)
      }</td><td class="verdict">—</td></tr>`;
    }
    // Four significant digits: a level to 0.1 dB, a frequency to 0.1 Hz, a ratio to 0.001.
    const fmt = (v: number) => formatNumber(v, 4);
    const unit = t.unit !== "" ? ` ${escapeXml(t.unit)}` : "";
    const where = t.atNominalHz !== undefined
      ? ` in the ${fmt(t.atNominalHz)} Hz band`
      : t.atHz !== undefined
      ? ` at ${fmt(t.atHz)} Hz`
      : "";
    const failing = t.failing ?? [];
    const list = failing.length > 0
      ? `<div class="failing">${failing.length} ${
        t.atNominalHz !== undefined ? "band(s)" : "line(s)"
      } over the limit: ${
        failing.slice(0, 40).map((x) =>
          `${x.nominalHz !== undefined ? fmt(x.nominalHz) : fmt(x.atHz)} Hz (${
            fmt(x.margin)
          }${unit})`
        ).join(", ")
      }${failing.length > 40 ? ", …" : ""}</div>`
      : "";
    return `<tr class="${t.pass ? "pass" : "fail"}"><td>${escapeXml(t.id)}</td><td>${
      escapeXml(t.description)
    }</td><td>${fmt(t.value)}${unit}${where}${list}</td><td>${fmt(t.limit)}${unit}</td><td>${
      fmt(t.margin)
    }${unit}</td><td class="verdict">${t.pass ? "PASS" : "FAIL"}</td></tr>`;
  }).join("\n");
  return `<table class="targets"><thead><tr><th>Target</th><th>Requirement</th><th>Result</th><th>Limit</th><th>Margin</th><th>Verdict</th></tr></thead><tbody>${rows}</tbody></table>`;
}

/**
 * What a section's source line names: the files the run read for the step
 * (from the manifest, which every step has), else the source its result
 * names; "no recorded input" when neither says.
 */
function sourceNames(
  step: Manifest["steps"][number],
  common: { source?: string; test?: string },
): string {
  const names = step.inputs.map((i) => String(i.path).split("/").pop() ?? "");
  const fromResult = common.source ?? common.test;
  if (names.length === 0 && fromResult !== undefined) names.push(fromResult.split("/").pop() ?? "");
  const shown = names.filter((n) => n !== "");
  return shown.length > 0 ? shown.join(", ") : "no recorded input";
}

/** A section's state in the contents, worst first. */
type SectionStatus = "failed" | "target failed" | "warnings" | "ok";

/**
 * The state of a step's section: failed (no result shown), a target on it
 * not met, warnings (of the analysis, or a target on it that could not be
 * checked), or ok.
 */
function sectionStatus(
  section: Section,
  step: Manifest["steps"][number] | undefined,
  targets: readonly { id: string; analysis: string }[],
  outcomes: ReadonlyMap<string, TargetOutcome>,
  warned: ReadonlySet<string>,
): { status: SectionStatus; detail: string } {
  if (section.failed === true || step === undefined) return { status: "failed", detail: "" };
  const own = targets.filter((t) => t.analysis === step.id).map((t) => outcomes.get(t.id));
  const failing = own.filter((o) => o?.status === "checked" && !o.pass);
  if (failing.length > 0) {
    return { status: "target failed", detail: failing.map((o) => o!.id).join(", ") };
  }
  const unchecked = own.filter((o) => o === undefined || o.status === "not_checked");
  if (warned.has(step.id) || unchecked.length > 0) {
    return {
      status: "warnings",
      detail: unchecked.length > 0 ? `${unchecked.length} target(s) not checked` : "",
    };
  }
  return { status: "ok", detail: "" };
}

/** A section as the contents list it. */
interface ContentsEntry {
  readonly anchor: string;
  readonly heading: string;
  readonly status: SectionStatus;
  readonly detail: string;
}

/** The targets' own entry: failed when any is not met, warnings when any was not checked. */
function targetsStatus(targets: readonly TargetOutcome[]): ContentsEntry {
  const checked = targets.filter((t) => t.status === "checked");
  const failed = checked.filter((t) => !t.pass).length;
  const detail = targets.length === 0
    ? "none set"
    : `${checked.length - failed} of ${targets.length} met`;
  return {
    anchor: "targets",
    heading: "Targets",
    status: failed > 0 ? "target failed" : checked.length < targets.length ? "warnings" : "ok",
    detail,
  };
}

/**
 * The table of contents: every section with its status, each a link to it.
 * Plain links and `<details>` sections: it all works without JavaScript.
 */
function contents(entries: readonly ContentsEntry[]): string {
  const count = (status: SectionStatus) => entries.filter((e) => e.status === status).length;
  const summary = (["failed", "target failed", "warnings", "ok"] as const)
    .filter((s) => count(s) > 0)
    .map((s) => `${count(s)} × ${s}`)
    .join(" · ");
  return `<nav id="contents" class="contents" aria-label="Contents"><h2>Contents</h2><p class="note">${
    escapeXml(summary)
  }. Each section below opens and closes on its heading.</p><ol>${
    entries.map((e) =>
      `<li class="contents-${e.status.replace(" ", "-")}"><a href="#${escapeXml(e.anchor)}">${
        escapeXml(e.heading)
      }</a> ${statusBadge(e.status, e.detail)}</li>`
    ).join("")
  }<li><a href="#trace">Trace</a></li></ol></nav>`;
}

/** A section that opens and closes on its heading (open to start with, and in print). */
function collapsible(entry: ContentsEntry, inner: string): string {
  return `<details class="section" id="${escapeXml(entry.anchor)}" open><summary><h2>${
    escapeXml(entry.heading)
  }</h2> ${statusBadge(entry.status, entry.detail)}</summary>\n${inner}\n</details>`;
}

/** A status as a badge: a symbol and a word, so it reads without colour. */
function statusBadge(status: SectionStatus, detail = ""): string {
  const symbol = { "failed": "✕", "target failed": "✕", "warnings": "!", "ok": "✓" }[status];
  return `<span class="status status-${status.replace(" ", "-")}">${symbol} ${status}${
    detail !== "" ? `: ${escapeXml(detail)}` : ""
  }</span>`;
}

/** The anchor of a step's section (step ids are the plan's; encoded all the same). */
function sectionAnchor(stepId: string): string {
  return `section-${encodeURIComponent(stepId)}`;
}

/**
 * A figure: its static SVG (what prints and what shows without JavaScript)
 * and, for a line plot, its data for the interactive chart.
 */
function figureHtml(f: Figure, file: string): string {
  const id = `figure-${escapeXml(file)}`;
  const small = f.small === true ? ' class="small"' : "";
  if (f.html !== undefined) return `<figure id="${id}"${small}>${f.html}</figure>`;
  // Two layouts of the picture; the style sheet shows the one that suits the window.
  const pictures = f.narrow === undefined
    ? f.svg
    : `<div class="wide-picture">${f.svg}</div><div class="narrow-picture">${f.narrow}</div>`;
  if (f.chart === undefined) return `<figure id="${id}"${small}>${pictures}</figure>`;
  // JSON inside a script element: "<" escaped so that no "</script" can end it early.
  const json = JSON.stringify(f.chart).replace(/</g, "\\u003c");
  return `<figure id="${id}"${small} data-chart=""><div class="static">${pictures}</div><script type="application/json" class="chart-data">${json}</script></figure>`;
}

/**
 * `<outDir>/figures`, made if missing; refused when it is a link (it could
 * lead out of the folder) or not a folder.
 */
async function figuresFolder(outDir: string): Promise<string> {
  const dir = join(outDir, "figures");
  let info;
  try {
    info = await lstat(dir);
  } catch {
    await mkdir(dir);
    return dir;
  }
  if (info.isSymbolicLink() || !info.isDirectory()) {
    throw new QuiverError(
      `${dir} is ${
        info.isSymbolicLink() ? "a link" : "not a folder"
      }: the report writes its figures only into a folder of its own inside the output folder`,
      { file: dir },
      "usage",
    );
  }
  return dir;
}

/** A file of the vendored chart library (lib/report/vendor/uplot/). */
function vendor(file: string): string {
  return readFileSync(fileURLToPath(new URL(`./vendor/uplot/${file}`, import.meta.url)), "utf8");
}

/** The inlined chart library with its licence notice, and the script that draws the charts. */
function chartScripts(): string {
  const client = readFileSync(fileURLToPath(new URL("./chart_client.js", import.meta.url)), "utf8");
  const views = readFileSync(fileURLToPath(new URL("./views_client.js", import.meta.url)), "utf8");
  // "</" inside inlined code could close the script element; none may appear.
  const library = vendor("uPlot.iife.min.js");
  for (const code of [library, client, views]) {
    if (code.includes("</script")) throw new Error("inlined script holds </script");
  }
  return `<!-- uPlot 1.6.32, MIT licence:\n${
    vendor("LICENSE").replace(/--/g, "- -")
  }\n-->\n<script>${library}</script>\n<script>${client}</script>\n<script>${views}</script>`;
}

const STYLE = `
body { font-family: Helvetica, Arial, sans-serif; color: #22313f; margin: 0; background: #f4f1ea; }
header { background: #22313f; color: #f4f1ea; padding: 18px 32px; }
header h1 { margin: 0 0 4px 0; font-size: 22px; }
header p { margin: 2px 0; font-size: 13px; color: #cfd8e0; }
main { padding: 8px 32px 32px 32px; max-width: 1500px; }
h2 { border-bottom: 2px solid #c8553d; padding-bottom: 4px; margin-top: 32px; font-size: 18px; }
h3 { font-size: 15px; margin-bottom: 4px; }
figure { margin: 12px 0; background: #ffffff; border: 1px solid #d9d4c7; padding: 6px; display: block; }
figure svg { width: 100%; max-width: 1400px; height: auto; display: block; }
figure.live > .static { display: none; }
figure.small { display: inline-block; vertical-align: top; width: calc(50% - 20px); min-width: 320px; margin-right: 8px; }
.chart-tools { font-size: 12px; margin: 0 0 4px 0; display: flex; flex-wrap: wrap; gap: 6px; align-items: center; }
.chart-tools button { font: inherit; background: #f4f1ea; border: 1px solid #b9b2a2; border-radius: 3px; padding: 2px 8px; cursor: pointer; }
.chart-hint { color: #6b7785; }
.map-readout { font-size: 12px; color: #22313f; padding: 4px 2px; min-height: 1.4em; }
figure .uplot { font-family: Helvetica, Arial, sans-serif; }
figure .u-title { font-size: 14px; font-weight: 600; }
figure .u-legend { font-size: 12px; text-align: left; }
table { border-collapse: collapse; margin: 8px 0 16px 0; font-size: 13px; background: #ffffff; }
th, td { border: 1px solid #d9d4c7; padding: 4px 8px; text-align: left; }
th { background: #e8e2d4; }
tr.pass td.verdict { color: #1f6f3f; font-weight: 700; }
tr.fail td.verdict { color: #b02e1f; font-weight: 700; }
tr.unchecked td { color: #6b7785; }
.note { font-size: 12px; color: #5b6b7b; }
td .failing { font-size: 12px; color: #b02e1f; margin-top: 2px; }
.caveat { border-left: 4px solid #edae49; background: #fff8e6; padding: 8px 12px; font-size: 13px; }
figure .u-legend th, figure .u-legend td { border: none; background: none; padding: 1px 4px; font-weight: 400; }
figure .u-legend .u-value { color: #3d4b59; }
figure.live.legend-beside .uplot { display: grid; grid-template-columns: max-content minmax(0, 1fr); align-items: start; width: auto; }
figure.live.legend-beside .u-title { grid-column: 1 / -1; }
figure.live.legend-beside .u-legend { margin: 8px 0 0 12px; text-align: left; }
figure.live.legend-beside .u-legend.u-inline tr { display: block; margin: 0 0 4px 0; }
.narrow-picture { display: none; }
.contents { background: #ffffff; border: 1px solid #d9d4c7; padding: 6px 16px 10px 16px; margin: 16px 0; }
.contents h2 { border: none; margin: 6px 0 2px 0; }
.contents ol { columns: 2 340px; column-gap: 32px; padding-left: 24px; margin: 6px 0 0 0; font-size: 13px; }
.contents li { break-inside: avoid; margin: 3px 0; }
.contents a { color: #1d4e89; }
.contents-tools { display: inline-flex; gap: 6px; margin-left: 8px; }
.contents-tools button { font: inherit; font-size: 12px; background: #f4f1ea; border: 1px solid #b9b2a2; border-radius: 3px; padding: 1px 8px; cursor: pointer; }
.status { display: inline-block; font-size: 12px; font-weight: 700; line-height: 1.3; padding: 0 6px; border: 1px solid; border-radius: 3px; white-space: nowrap; }
.status-ok { color: #1f6f3f; background: #e8f3ec; border-color: #9cc5aa; }
.status-warnings { color: #6e4a00; background: #fff4d6; border-color: #d9a93e; }
.status-failed, .status-target-failed { color: #ffffff; background: #b02e1f; border-color: #6f1a10; }
details.section > summary { list-style: none; cursor: pointer; display: flex; flex-wrap: wrap; align-items: baseline; gap: 4px 10px; border-bottom: 2px solid #c8553d; margin-top: 28px; padding-bottom: 4px; }
details.section > summary::-webkit-details-marker { display: none; }
details.section > summary::before { content: "\\25BE"; font-size: 14px; width: 14px; color: #c8553d; }
details.section:not([open]) > summary::before { content: "\\25B8"; }
details.section > summary h2 { display: inline; border: none; margin: 0; padding: 0; }
details.section > summary:focus-visible { outline: 2px solid #1d4e89; outline-offset: 2px; }
.to-contents { position: fixed; right: 14px; bottom: 14px; z-index: 10; background: #22313f; color: #f4f1ea; padding: 6px 14px; border-radius: 16px; font-size: 13px; text-decoration: none; box-shadow: 0 1px 4px rgba(0, 0, 0, 0.3); }
.to-contents:focus-visible { outline: 2px solid #edae49; }
@media print { body { background: #ffffff; } header { background: #ffffff; color: #000000; } figure { break-inside: avoid; } figure.live > .static { display: block; } .interactive, .chart-tools, .map-readout, .to-contents, .contents-tools { display: none; } }
@media (max-width: 1340px) { figure.small { display: block; width: auto; min-width: 0; margin-right: 0; } }
@media (max-width: 1039px) { .wide-picture { display: none; } .narrow-picture { display: block; } .narrow-picture svg { max-width: 760px; } }
@media (max-width: 760px) { main { padding: 8px 10px 24px 10px; } header { padding: 12px 10px; } table { font-size: 11px; } .contents { padding: 4px 10px 8px 10px; } .contents ol { padding-left: 20px; } }
`;

/**
 * Writes `<outDir>/<file>` and `<outDir>/figures/*.svg` from a finished run.
 * Returns the report's path.
 *
 * @example
 * ```ts
 * import { writeReport } from "./html_report.ts";
 * import { runPlan } from "../plan/runner.ts";
 * import { mkdtemp, readFile, writeFile } from "node:fs/promises";
 * const dir = await mkdtemp("/tmp/quiver-doc-");
 * await writeFile(`${dir}/run.csv`, "time_s,mic [Pa]\n0,0\n0.5,1\n1,0\n");
 * await writeFile(`${dir}/plan.json`, JSON.stringify({ quiver_plan: 1, title: "doc",
 *   recordings: { r: { file: "run.csv" } }, analyses: [{ id: "s", command: "spectrum", recording: "r", options: {} }],
 *   report: { title: "doc" } }));
 * // A stand-in command writing a two-line spectrum; quiver's own commands come from cli/commands.ts.
 * const spectrum = { validate() {}, async run(argv: readonly string[]) {
 *   await writeFile(argv[argv.indexOf("--out") + 1], JSON.stringify({
 *     metadata: { analysis: "spectrum", kind: "rms", df_hz: 1, averages: 1, window: "hann" },
 *     columns: [{ name: "frequency_hz", unit: "", values: [0, 1] }, { name: "mic", unit: "Pa", values: [0, 0.5] }] }));
 * } };
 * await runPlan(`${dir}/plan.json`, { outDir: `${dir}/out`, commands: { spectrum }, progress: { start() {}, end() {} }, report: writeReport });
 * if (!(await readFile(`${dir}/out/report.html`, "utf8")).includes("<svg")) throw new Error();
 * ```
 */
export async function writeReport(outDir: string, manifest: Manifest, plan: Plan): Promise<string> {
  const sections: Section[] = [];
  const titles = new Map<string, string>();
  for (const a of plan.analyses) titles.set(a.id, a.title ?? a.id);
  for (const c of plan.comparisons) titles.set(c.id, c.title ?? c.id);
  const outcomes = new Map((manifest.targets as TargetOutcome[]).map((t) => [t.id, t]));
  const limitsOf = (analysis: string): CurveLimit[] =>
    plan.targets.flatMap((t) =>
      t.type === "limit_curve" && t.of.analysis === analysis
        ? [{ id: t.id, channel: t.of.channel, points: t.points, outcome: outcomes.get(t.id) }]
        : []
    );
  // Each step's section, for its anchor and status in the contents.
  const stepOf = new Map<Section, Manifest["steps"][number]>();
  const warned = new Set<string>();
  for (const step of manifest.steps) {
    const start = sections.length;
    try {
      await stepSection(step);
    } finally {
      for (let k = start; k < sections.length; k++) stepOf.set(sections[k], step);
    }
  }
  async function stepSection(step: Manifest["steps"][number]): Promise<void> {
    const title = titles.get(step.id) ?? step.id;
    if (step.status !== "ok") {
      sections.push({
        heading: title,
        note: `${step.command}: ${step.status}${
          step.error !== undefined ? ` — ${step.error}` : ""
        }`,
        figures: [],
        failed: true,
      });
      return;
    }
    const r = await readJson(join(outDir, `${step.id}.json`));
    if (r instanceof QuiverError) {
      sections.push({
        heading: title,
        note: `cannot show the result: ${r.message}`,
        figures: [],
        failed: true,
      });
      return;
    }
    const common = commonMetadata(r);
    const warnings = common.warnings ?? [];
    if (warnings.length > 0) warned.add(step.id);
    const note = `${step.command} of ${sourceNames(step, common)}${
      warnings.length > 0 ? `. Warnings: ${warnings.join("; ")}` : ""
    }`;
    // A result whose metadata is not what its command writes is named, not drawn from guesses.
    try {
      switch (step.command) {
        case "spectrum":
          sections.push({ heading: title, note, figures: spectrumFigures(step.id, title, r) });
          break;
        case "frf":
        case "hammer": {
          if (r.metadata?.analysis === "frf_matrix") {
            sections.push({
              heading: title,
              note,
              figures: await frfMatrixFigures(step.id, title, r, outDir),
            });
            break;
          }
          const hits = resultMetadata(r, "frf").hits_summary;
          if (step.command === "hammer") {
            sections.push({
              heading: title,
              note: hits === undefined ? note : `${note}; ${hits}`,
              figures: await hammerFigures(step.id, title, r, outDir),
            });
            break;
          }
          sections.push({
            heading: title,
            note: hits === undefined ? note : `${note}; ${hits}`,
            figures: frfFigures(step.id, title, r),
          });
          break;
        }
        case "damping":
          sections.push({ heading: title, note, figures: [], html: modeTable(r) });
          break;
        case "paths": {
          const { figures, html } = await pathsSection(step.id, title, r, outDir);
          sections.push({ heading: title, note, figures, html });
          break;
        }
        case "modal": {
          const { figures, html } = await modalSection(step.id, title, r, outDir);
          sections.push({ heading: title, note, figures, html });
          break;
        }
        case "mac": {
          const { figures, html } = macSection(step.id, title, r);
          sections.push({ heading: title, note, figures, html });
          break;
        }
        case "bands": {
          const overall = resultMetadata(r, "bands").overall
            .map((o) =>
              // Raw text: the note is escaped once, where it is rendered.
              `${o.channel}: ${formatFixed(o.level_db, 1)} ${o.unit}`
            )
            .join("; ");
          sections.push({
            heading: title,
            note: `${note}; overall ${overall}`,
            figures: bandFigures(step.id, title, r, limitsOf(step.id)),
          });
          break;
        }
        case "level":
          sections.push({ heading: title, note, figures: levelFigures(step.id, title, r) });
          break;
        case "spectrogram":
          sections.push({ heading: title, note, figures: spectrogramFigures(step.id, title, r) });
          break;
        case "orders":
          sections.push({
            heading: title,
            note,
            figures: await orderFigures(step.id, title, r, outDir),
          });
          break;
        case "compare": {
          const { figures, html } = comparisonFigures(step.id, title, r);
          sections.push({
            heading: title,
            note: `test ${(resultMetadata(r, "compare").test ?? "").split("/").pop()} against ${
              (resultMetadata(r, "compare").simulation ?? "").split("/").pop()
            }`,
            figures,
            html,
          });
          break;
        }
      }
    } catch (error) {
      if (!(error instanceof QuiverError)) throw error;
      sections.push({
        heading: title,
        note: `cannot show the result: ${error.message}`,
        figures: [],
        failed: true,
      });
    }
  }
  // The raw time histories of the recordings, after the results they were read for.
  sections.push(await recordingsSection(plan, manifest.plan.path));
  // Figure names hold channel names read from data: each becomes a safe, distinct file name.
  const allFigures = sections.flatMap((s) => s.figures);
  const fileOf = new Map(
    uniqueFileNames(allFigures.map((f) => f.name)).map((file, i) => [allFigures[i], file]),
  );
  const figuresDir = await figuresFolder(outDir);
  for (const [f, file] of fileOf) {
    await writeFileAtomic(join(figuresDir, `${file}.svg`), f.svg + "\n");
  }
  const trace = manifest.steps.map((s) =>
    `<tr><td>${escapeXml(s.id)}</td><td>${escapeXml(s.command)}</td><td>${
      escapeXml(s.status)
    }</td><td>${
      s.inputs.map((i) =>
        `${escapeXml(String(i.path).split("/").pop())} (${escapeXml(i.bytes)} B, sha256 ${
          escapeXml(String(i.sha256).slice(0, 12))
        }…)`
      ).join("<br>")
    }</td><td>${Object.values(s.outputs).map((o) => escapeXml(o.path)).join("<br>")}</td></tr>`
  ).join("\n");
  const title = plan.report?.title ?? plan.title;
  const planTargets = plan.targets.map((t) => ({ id: t.id, analysis: t.of.analysis }));
  const entries: ContentsEntry[] = sections.map((s) => {
    const step = stepOf.get(s);
    return {
      anchor: sectionAnchor(step?.id ?? s.heading),
      heading: s.heading,
      ...sectionStatus(s, step, planTargets, outcomes, warned),
    };
  });
  const body = sections.map((s, i) =>
    collapsible(
      entries[i],
      `${s.note !== undefined ? `<p class="note">${escapeXml(s.note)}</p>` : ""}${
        s.figures.map((f) => figureHtml(f, fileOf.get(f) ?? "")).join("\n")
      }${s.html ?? ""}`,
    )
  ).join("\n");
  const targetsEntry = targetsStatus(manifest.targets as TargetOutcome[]);
  const html = `<!DOCTYPE html>
<html lang="en"><head><meta charset="utf-8"><title>${escapeXml(title)}</title>
<meta name="generator" content="quiver ${escapeXml(manifest.quiver_version)}">
<style>${STYLE}${VIEWS_STYLE}${vendor("uPlot.min.css")}</style></head>
<body><header><h1>${escapeXml(title)}</h1>
<p>${escapeXml(plan.description ?? "")}</p>
<p>quiver ${escapeXml(manifest.quiver_version)} · plan ${
    escapeXml(manifest.plan.path.split("/").pop() ?? "")
  } (sha256 ${escapeXml(String(manifest.plan.sha256).slice(0, 12))}…) · run ${
    escapeXml(manifest.started)
  } · status ${escapeXml(manifest.status)}</p></header>
<main>
<p class="caveat">Levels in this report are for engineering comparison between tests, simulations and targets. quiver is not a certified sound level meter; for occupational noise exposure and hearing protection follow local regulations and use certified instruments.</p>
${contents([targetsEntry, ...entries])}
${collapsible(targetsEntry, targetTable(manifest.targets as TargetOutcome[]))}
${body}
<details class="section" id="trace" open><summary><h2>Trace</h2></summary>
<p class="note">Every result in this folder, with the inputs it was computed from; manifest.json holds the full record (options, hashes, times).</p>
<table><thead><tr><th>Step</th><th>Command</th><th>Status</th><th>Inputs</th><th>Outputs</th></tr></thead><tbody>${trace}</tbody></table>
</details>
</main>
<a class="to-contents" href="#contents">↑ Contents</a>
${chartScripts()}
</body></html>
`;
  const path = join(outDir, plan.report?.file ?? "report.html");
  await writeFileAtomic(path, html);
  return path;
}
