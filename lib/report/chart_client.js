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
  // A figure this wide or wider shows the legend in a column beside the plot (as the static
  // pictures do); a narrower one under it, so the plot keeps the width.
  const LEGEND_BESIDE_MIN = 760;
  const LEGEND_COLUMN = 240;
  const besideLegend = (figure) => figure.clientWidth >= LEGEND_BESIDE_MIN;
  const chartWidth = (figure) =>
    Math.max(
      280,
      Math.min(figure.clientWidth - 16 - (besideLegend(figure) ? LEGEND_COLUMN : 0), 1600),
    );
  // The label of the value axis on the scale shown: only a logarithmic view is cut to 120 dB.
  const yLabel = (spec, state) => (state.yLog ? spec.y.labels.log : spec.y.labels.linear);

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

  // Whether a view differs from the whole range (relative to the range's span; in decades on a
  // logarithmic scale, where the bottom of a 12-decade range is a hair above zero).
  const zoomedFrom = (view, home, log) => {
    const to = log ? (v) => Math.log10(v) : (v) => v;
    const [v0, v1, h0, h1] = [view[0], view[1], home[0], home[1]].map(to);
    const span = Math.abs(h1 - h0) || 1;
    return Math.abs(v0 - h0) > 1e-6 * span || Math.abs(v1 - h1) > 1e-6 * span;
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
        axes: [axis(spec.x.label, 50, state.xLog), axis(yLabel(spec, state), 72, state.yLog)],
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
    // The report's whole range on each axis, for the scale shown.
    u.quiverHome = () => ({
      x: [state.xLog && !(spec.x.min > 0) ? u.data[0][0] : spec.x.min, spec.x.max],
      y: [state.yLog ? state.yMinLog : spec.y.min, spec.y.max],
    });
    u.quiverReset = () => {
      const home = u.quiverHome();
      u.batch(() => {
        u.setScale("x", { min: home.x[0], max: home.x[1] });
        u.setScale("y", { min: home.y[0], max: home.y[1] });
      });
    };
    u.quiverReset();
    // After uPlot's own double-click handler (registered first): back to the report's range.
    u.over.addEventListener("dblclick", () => u.quiverReset());
    // Shift + drag pans: the view moves with the pointer, keeping its width (in log units on a
    // log axis), instead of uPlot's own drag, which would zoom.
    // (On the chart's root in the capture phase: it runs before any listener on the plot area.)
    u.root.addEventListener("mousedown", (down) => {
      if (!down.shiftKey || down.button !== 0 || !u.over.contains(down.target)) return;
      down.stopImmediatePropagation();
      down.preventDefault();
      const start = {
        x: down.clientX,
        y: down.clientY,
        xs: [u.scales.x.min, u.scales.x.max],
        ys: [u.scales.y.min, u.scales.y.max],
      };
      const box = u.over.getBoundingClientRect();
      const shifted = ([lo, hi], fraction, log) => {
        if (!log) return [lo - fraction * (hi - lo), hi - fraction * (hi - lo)];
        const k = Math.pow(hi / lo, fraction);
        return [lo / k, hi / k];
      };
      const move = (event) => {
        const fx = (event.clientX - start.x) / box.width;
        const fy = (start.y - event.clientY) / box.height;
        const [x0, x1] = shifted(start.xs, fx, state.xLog);
        const [y0, y1] = shifted(start.ys, fy, state.yLog);
        u.batch(() => {
          u.setScale("x", { min: x0, max: x1 });
          u.setScale("y", { min: y0, max: y1 });
        });
      };
      const up = () => {
        globalThis.removeEventListener("mousemove", move, true);
        globalThis.removeEventListener("mouseup", up, true);
      };
      globalThis.addEventListener("mousemove", move, true);
      globalThis.addEventListener("mouseup", up, true);
    }, true);
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
      // A logarithmic view shows at most 120 dB below the largest value (the report's rule).
      yMinLog: spec.y.logMin,
    };
    const tools = document.createElement("div");
    tools.className = "chart-tools";
    const holder = document.createElement("div");
    holder.className = "interactive";
    let u;
    // A switch of one axis's scale keeps the view: the other axis as it was, the switched one
    // as it was when the reader had zoomed it and the range exists on the new scale (no zero
    // or negative end on a logarithmic one), else the whole range.
    const rebuild = (switched) => {
      const home = u.quiverHome();
      const view = { x: [u.scales.x.min, u.scales.x.max], y: [u.scales.y.min, u.scales.y.max] };
      const wasLog = switched === "x" ? state.xLog : state.yLog;
      const zoomed = zoomedFrom(view[switched], home[switched], wasLog);
      if (switched === "x") state.xLog = !state.xLog;
      else state.yLog = !state.yLog;
      u.destroy();
      u = build(figure, spec, state);
      const next = u.quiverHome();
      const log = switched === "x" ? state.xLog : state.yLog;
      const keep = zoomed && (!log || view[switched][0] > 0);
      const range = { ...view, [switched]: keep ? view[switched] : next[switched] };
      u.batch(() => {
        u.setScale("x", { min: range.x[0], max: range.x[1] });
        u.setScale("y", { min: range.y[0], max: range.y[1] });
      });
    };
    tools.appendChild(
      button("Reset view", "Back to the whole range (or double-click the plot)", () => {
        u.quiverReset();
      }),
    );
    if (positive(spec.data[0])) {
      tools.appendChild(button("x: lin / log", "Linear or logarithmic x axis", () => {
        rebuild("x");
      }));
    }
    if (spec.data.slice(1).some(positive) && spec.y.max > 0) {
      tools.appendChild(button("y: lin / log", "Linear or logarithmic y axis", () => {
        rebuild("y");
      }));
    }
    const hint = document.createElement("span");
    hint.className = "chart-hint";
    hint.textContent =
      "Drag to zoom, Shift + drag to pan, double-click to reset, click a legend entry to hide it";
    tools.appendChild(hint);
    figure.appendChild(tools);
    figure.appendChild(holder);
    figure.classList.add("live");
    figure.classList.toggle("legend-beside", besideLegend(figure));
    u = build(figure, spec, state);
    let resizing = 0;
    const fit = () => {
      // A figure in a closed section has no width: it is fitted when the section opens.
      if (figure.clientWidth === 0) return;
      figure.classList.toggle("legend-beside", besideLegend(figure));
      u.setSize({ width: chartWidth(figure), height: spec.height });
    };
    globalThis.addEventListener("resize", () => {
      clearTimeout(resizing);
      resizing = setTimeout(fit, 100);
    });
    const section = figure.closest("details");
    if (section !== null) {
      section.addEventListener("toggle", () => {
        if (section.open) fit();
      });
    }
  });

  // Colour maps stay pictures; a readout under each names the cell under the pointer: its x and
  // y, and its value read back from the pixel's colour (the ramp is monotone in lightness, so a
  // colour names one value; 8-bit colour makes it approximate, hence "≈").
  const rampSamples = (stops) => {
    const rgb = stops.map((h) => [1, 3, 5].map((k) => parseInt(h.slice(k, k + 2), 16)));
    const samples = [];
    for (let n = 0; n <= 1000; n++) {
      const t = (n / 1000) * (rgb.length - 1);
      const i = Math.min(rgb.length - 2, Math.floor(t));
      const f = t - i;
      samples.push([0, 1, 2].map((k) => Math.round(rgb[i][k] + f * (rgb[i + 1][k] - rgb[i][k]))));
    }
    return samples;
  };
  document.querySelectorAll("figure svg.map[data-x]").forEach((map) => {
    const figure = map.closest("figure");
    const image = map.querySelector("image");
    if (figure === null || image === null) return;
    const [x0, x1, columns] = map.dataset.x.split(",").map(Number);
    const [y0, y1, rows] = map.dataset.y.split(",").map(Number);
    const [z0, z1] = map.dataset.z.split(",").map(Number);
    const [xLabel, yLabel, zLabel] = JSON.parse(map.dataset.labels);
    const samples = rampSamples(map.dataset.ramp.split(","));
    const readout = document.createElement("div");
    readout.className = "map-readout";
    readout.textContent = "Move the pointer over the map to read a cell";
    // Under its own picture: a figure holds a wide and a narrow one, only one of them shown.
    (map.closest(".wide-picture, .narrow-picture") || figure).appendChild(readout);
    const picture = new Image();
    const canvas = document.createElement("canvas");
    let pixels = null;
    picture.onload = () => {
      canvas.width = picture.naturalWidth;
      canvas.height = picture.naturalHeight;
      const context = canvas.getContext("2d");
      context.drawImage(picture, 0, 0);
      pixels = context.getImageData(0, 0, canvas.width, canvas.height).data;
    };
    picture.src = image.getAttribute("href");
    const name = (label) => label.replace(/ \[.*\]$/, "");
    const unit = (label) => (/\[([^\]]*)\]\s*$/.exec(label) || [])[1] || "";
    // The whole picture listens: cell labels and order lines drawn over the map sit on top of it.
    const host = map.ownerSVGElement || map;
    host.addEventListener("mousemove", (event) => {
      const box = map.getBoundingClientRect();
      const inside = event.clientX >= box.left && event.clientX < box.right &&
        event.clientY >= box.top && event.clientY < box.bottom;
      if (!inside) return;
      const column = Math.min(
        columns - 1,
        Math.floor(((event.clientX - box.left) / box.width) * columns),
      );
      const fromTop = Math.min(
        rows - 1,
        Math.floor(((event.clientY - box.top) / box.height) * rows),
      );
      const row = rows - 1 - fromTop;
      const x = columns > 1 ? x0 + (column * (x1 - x0)) / (columns - 1) : x0;
      const y = rows > 1 ? y0 + (row * (y1 - y0)) / (rows - 1) : y0;
      let value = "–";
      if (pixels !== null) {
        // The image's pixel for this cell: cells merge by whole blocks (svg_plot.ts mapImage).
        const perX = Number(image.getAttribute("width")) / canvas.width;
        const perY = Number(image.getAttribute("height")) / canvas.height;
        const top = rows - Number(image.getAttribute("height"));
        const px = Math.floor(column / perX), py = Math.floor((fromTop - top) / perY);
        const at = (py * canvas.width + px) * 4;
        const rgb = [pixels[at], pixels[at + 1], pixels[at + 2]];
        if (rgb[0] === 255 && rgb[1] === 255 && rgb[2] === 255) value = "no value";
        else {
          let best = 0, distance = Infinity;
          samples.forEach((c, n) => {
            const d = (c[0] - rgb[0]) ** 2 + (c[1] - rgb[1]) ** 2 + (c[2] - rgb[2]) ** 2;
            if (d < distance) {
              distance = d;
              best = n;
            }
          });
          const z = z0 + (best / 1000) * (z1 - z0);
          // A colour bar titled with a bare unit ("dB re 1 Pa") is its own unit.
          const zUnit = unit(zLabel) || zLabel;
          value = best === 0 ? "≤ " + withUnit(z0, zUnit) : "≈ " + withUnit(z, zUnit);
        }
      }
      readout.textContent = name(xLabel) + " " + withUnit(x, unit(xLabel)) + ", " + name(yLabel) +
        " " + withUnit(y, unit(yLabel)) + ": " + value;
    });
  });

  // Sections: "Open all" and "Close all" beside the contents' heading (the sections open and
  // close on their own headings without this script), and every section open for printing.
  const sections = () => document.querySelectorAll("details.section");
  const heading = document.querySelector("#contents h2");
  if (heading !== null) {
    const tools = document.createElement("span");
    tools.className = "contents-tools";
    tools.appendChild(button("Open all", "Open every section", () => {
      sections().forEach((d) => (d.open = true));
    }));
    tools.appendChild(button("Close all", "Close every section to its heading", () => {
      sections().forEach((d) => (d.open = false));
    }));
    heading.appendChild(tools);
  }
  globalThis.addEventListener("beforeprint", () => sections().forEach((d) => (d.open = true)));
})();
