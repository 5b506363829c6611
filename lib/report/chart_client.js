// The report's interactive charts, run in the reader's browser (plain JS, inlined into the
// report after uPlot). Each <figure data-chart> carries its data as JSON beside its static SVG;
// this script draws the chart with uPlot and hides the SVG on screen. Without JavaScript, and
// in print, the SVG is what shows.
(() => {
  "use strict";
  const charts = {};
  globalThis.quiverCharts = charts;

  // Readout numbers: 5 significant digits, exponent form outside 1e-3 … 1e5.
  const fmt = (v) => {
    if (v === null || v === undefined || !isFinite(v)) return "–";
    const a = Math.abs(v);
    if (a !== 0 && (a >= 1e5 || a < 1e-3)) return v.toExponential(4);
    return String(Number(v.toPrecision(5)));
  };
  const withUnit = (v, unit) =>
    v === null || v === undefined ? "–" : fmt(v) + (unit ? " " + unit : "");
  // Tick labels: as few digits as the tick needs (ticks are round numbers).
  const tick = (v) => {
    const a = Math.abs(v);
    if (a !== 0 && (a >= 1e5 || a < 1e-3)) return Number(v.toPrecision(4)).toExponential();
    return String(Number(v.toPrecision(6)));
  };
  const tickLabels = (_u, values) => values.map((v) => (v === null ? "" : tick(v)));
  // Log-axis ticks as the static pictures have them: decades over a wide range, 1-2-5 (and 3)
  // within a few decades; uPlot's default gives a grid line at every 1 … 9.
  const logSplits = (_u, _axis, min, max) => {
    const decades = Math.log10(max / min);
    const steps = decades > 5 ? [1] : decades > 2 ? [1, 2, 5] : [1, 2, 3, 5];
    const ticks = [];
    for (let e = Math.floor(Math.log10(min)); e <= Math.ceil(Math.log10(max)); e++) {
      for (const m of steps) {
        const v = m * 10 ** e;
        if (v >= min * 0.999 && v <= max * 1.001) ticks.push(v);
      }
    }
    return ticks;
  };
  const chartWidth = (figure) => Math.max(320, Math.min(figure.clientWidth - 16, 1600));

  // The data a view can draw: on a log axis only positive values exist.
  const viewData = (spec, xLog, yLog) => {
    const x = spec.data[0];
    let start = 0;
    if (xLog) { while (start < x.length && !(x[start] > 0)) start++; }
    return spec.data.map((column, i) => {
      const part = column.slice(start);
      return i > 0 && yLog ? part.map((v) => (v !== null && v > 0 ? v : null)) : part;
    });
  };

  const build = (figure, spec, state) => {
    const holder = figure.querySelector(".interactive");
    holder.innerHTML = "";
    // The range is the one asked for: uPlot would otherwise widen a log range to whole decades.
    const asked = (_u, min, max) => [min, max];
    const series = [{
      label: spec.x.label.replace(/ \[.*\]$/, ""),
      value: (_u, v) => withUnit(v, spec.x.unit),
    }];
    spec.series.forEach((s, i) => {
      series.push({
        label: s.name,
        stroke: s.colour,
        width: 1.6,
        dash: s.dashed ? [5, 3] : undefined,
        spanGaps: spec.spanGaps,
        show: state.shown[i] !== false,
        points: s.markers ? { show: true, size: 5, fill: s.colour } : { show: false },
        paths: s.markers ? () => null : undefined,
        value: (_u, v) => withUnit(v, spec.y.unit),
      });
    });
    const axis = (label, size, log) => ({
      label,
      values: tickLabels,
      size,
      stroke: "#3d4b59",
      grid: { stroke: "#e3e7ec", width: 1 },
      ticks: { stroke: "#c9d0d8", width: 1 },
      ...(log ? { splits: logSplits } : {}),
    });
    const u = new uPlot(
      {
        title: spec.title,
        width: chartWidth(figure),
        height: spec.height,
        scales: {
          x: { time: false, distr: state.xLog ? 3 : 1, log: 10, auto: false, range: asked },
          y: { distr: state.yLog ? 3 : 1, log: 10, auto: false, range: asked },
        },
        axes: [axis(spec.x.label, 50, state.xLog), axis(spec.y.label, 72, state.yLog)],
        series,
        cursor: { drag: { x: true, y: true, uni: 24 } },
        legend: { live: true },
        hooks: {
          setSeries: [(_u, i, opts) => {
            if (i !== null && i > 0 && opts.show !== undefined) state.shown[i - 1] = opts.show;
          }],
        },
      },
      viewData(spec, state.xLog, state.yLog),
      holder,
    );
    u.quiverReset = () => {
      const xMin = state.xLog && !(spec.x.min > 0) ? u.data[0][0] : spec.x.min;
      u.batch(() => {
        u.setScale("x", { min: xMin, max: spec.x.max });
        u.setScale("y", { min: state.yLog ? state.yMinLog : spec.y.min, max: spec.y.max });
      });
    };
    u.quiverReset();
    // After uPlot's own double-click handler (registered first): back to the report's range.
    u.over.addEventListener("dblclick", () => u.quiverReset());
    charts[figure.id.replace(/^figure-/, "")] = u;
    return u;
  };

  const button = (text, title, onClick) => {
    const b = document.createElement("button");
    b.type = "button";
    b.textContent = text;
    b.title = title;
    b.addEventListener("click", onClick);
    return b;
  };

  document.querySelectorAll("figure[data-chart]").forEach((figure) => {
    const source = figure.querySelector("script.chart-data");
    if (source === null || typeof uPlot === "undefined") return;
    const spec = JSON.parse(source.textContent);
    const positive = (values) => values.some((v) => v !== null && v > 0);
    const state = {
      xLog: spec.x.log,
      yLog: spec.y.log,
      shown: spec.series.map(() => true),
      // A linear axis turned logarithmic shows 120 dB of a power below the largest value.
      yMinLog: spec.y.log ? spec.y.min : spec.y.max / 1e12,
    };
    const tools = document.createElement("div");
    tools.className = "chart-tools";
    const holder = document.createElement("div");
    holder.className = "interactive";
    let u;
    const rebuild = () => {
      u.destroy();
      u = build(figure, spec, state);
    };
    tools.appendChild(
      button("Reset view", "Back to the whole range (or double-click the plot)", () => {
        u.quiverReset();
      }),
    );
    if (positive(spec.data[0])) {
      tools.appendChild(button("x: lin / log", "Linear or logarithmic x axis", () => {
        state.xLog = !state.xLog;
        rebuild();
      }));
    }
    if (spec.data.slice(1).some(positive) && spec.y.max > 0) {
      tools.appendChild(button("y: lin / log", "Linear or logarithmic y axis", () => {
        state.yLog = !state.yLog;
        rebuild();
      }));
    }
    const hint = document.createElement("span");
    hint.className = "chart-hint";
    hint.textContent = "Drag to zoom, double-click to reset, click a legend entry to hide it";
    tools.appendChild(hint);
    figure.appendChild(tools);
    figure.appendChild(holder);
    figure.classList.add("live");
    u = build(figure, spec, state);
    let resizing = 0;
    globalThis.addEventListener("resize", () => {
      clearTimeout(resizing);
      resizing = setTimeout(
        () => u.setSize({ width: chartWidth(figure), height: spec.height }),
        100,
      );
    });
  });
})();
