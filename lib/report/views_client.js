// The report's own views, run in the reader's browser (plain JS, inlined after uPlot and
// chart_client.js): the time histories of the recordings (zoomable min/max envelopes with the
// plan's slice marks and clipping marks) and the mode-shape animation. Without JavaScript, and
// in print, the static pictures show.
(() => {
  "use strict";
  const histories = {};
  const shapes = {};
  globalThis.quiverHistories = histories;
  globalThis.quiverShapes = shapes;

  const button = (text, title, onClick) => {
    const b = document.createElement("button");
    b.type = "button";
    b.textContent = text;
    b.title = title;
    b.addEventListener("click", onClick);
    return b;
  };
  const fmt = (v) => {
    if (v === null || v === undefined || !isFinite(v)) return "–";
    const a = Math.abs(v);
    if (a !== 0 && (a >= 1e5 || a < 1e-3)) return v.toExponential(4);
    return String(Number(v.toPrecision(5)));
  };
  const PALETTE = ["#1d4e89", "#d1495b", "#2e8b57", "#edae49", "#6a4c93"];
  const fill = (hex) => {
    const [r, g, b] = [1, 3, 5].map((k) => parseInt(hex.slice(k, k + 2), 16));
    return `rgba(${r},${g},${b},0.45)`;
  };

  // Time histories: one uPlot panel per channel, the band between each column's min and max
  // filled; the panels of a recording zoom together (drag across any of them).
  document.querySelectorAll("figure script.history-data").forEach((source) => {
    if (typeof uPlot === "undefined") return;
    const figure = source.closest("figure");
    const spec = JSON.parse(source.textContent);
    const tools = document.createElement("div");
    tools.className = "chart-tools";
    const holder = document.createElement("div");
    holder.className = "interactive history";
    const heading = document.createElement("div");
    heading.className = "history-title";
    heading.textContent = spec.title;
    figure.appendChild(tools);
    figure.appendChild(heading);
    figure.appendChild(holder);
    const t0 = spec.t[0], t1 = spec.t[spec.t.length - 1];
    const width = () => Math.max(320, Math.min(figure.clientWidth - 16, 1600));
    const panels = [];
    let syncing = false;
    const marksHook = (u, k) => {
      const ctx = u.ctx;
      const { left, top, width: w, height: h } = u.bbox;
      const ratio = globalThis.devicePixelRatio || 1;
      ctx.save();
      // Clipping: red ticks along the top of the panel at the clipped columns.
      ctx.strokeStyle = "#b02e1f";
      ctx.lineWidth = 2 * ratio;
      for (const i of spec.channels[k].clipped) {
        const x = u.valToPos(spec.t[i], "x", true);
        if (x < left || x > left + w) continue;
        ctx.beginPath();
        ctx.moveTo(x, top);
        ctx.lineTo(x, top + 8 * ratio);
        ctx.stroke();
      }
      // The plan's slices: dashed lines across the panel, named in the first panel.
      ctx.strokeStyle = "#22313f";
      ctx.fillStyle = "#22313f";
      ctx.lineWidth = 1.4 * ratio;
      ctx.setLineDash([6 * ratio, 3 * ratio]);
      ctx.font = `${11 * ratio}px Helvetica, Arial, sans-serif`;
      // Labels that would run into one another drop a line.
      const taken = [];
      for (const m of spec.marks) {
        const x = u.valToPos(m.t, "x", true);
        if (x < left || x > left + w) continue;
        ctx.beginPath();
        ctx.moveTo(x, top);
        ctx.lineTo(x, top + h);
        ctx.stroke();
        if (k === 0) {
          const size = ctx.measureText(m.label).width;
          const from = m.edge === "start" ? x + 4 * ratio : x - 4 * ratio - size;
          let row = 0;
          while (taken.some((b) => b.row === row && from < b.to && from + size > b.from)) row++;
          taken.push({ from, to: from + size, row });
          ctx.textAlign = "left";
          const base = top + (12 + 13 * row) * ratio;
          // A pale ground under the label, so it reads over the band.
          ctx.fillStyle = "rgba(255,255,255,0.85)";
          ctx.fillRect(from - 2 * ratio, base - 10 * ratio, size + 4 * ratio, 13 * ratio);
          ctx.fillStyle = "#22313f";
          ctx.fillText(m.label, from, base);
        }
      }
      ctx.restore();
    };
    spec.channels.forEach((c, k) => {
      const colour = PALETTE[k % PALETTE.length];
      const unit = c.unit ? " " + c.unit : "";
      const u = new uPlot(
        {
          width: width(),
          height: 100,
          title: c.name,
          scales: { x: { time: false, auto: false, range: (_u, min, max) => [min, max] } },
          series: [
            { label: "Time", value: (_u, v) => (v === null ? "–" : fmt(v) + " s") },
            { label: c.name + " min", stroke: colour, width: 0.8, value: (_u, v) => fmt(v) + unit },
            { label: c.name + " max", stroke: colour, width: 0.8, value: (_u, v) => fmt(v) + unit },
          ],
          bands: [{ series: [2, 1], fill: fill(colour) }],
          axes: [
            {
              stroke: "#3d4b59",
              grid: { stroke: "#e3e7ec", width: 1 },
              size: k === spec.channels.length - 1 ? 40 : 24,
              label: k === spec.channels.length - 1 ? "Time [s]" : undefined,
            },
            {
              stroke: "#3d4b59",
              grid: { stroke: "#e3e7ec", width: 1 },
              size: 72,
              label: c.unit ? "[" + c.unit + "]" : "",
            },
          ],
          cursor: { drag: { x: true, y: false } },
          legend: { show: false },
          hooks: {
            draw: [(u) => marksHook(u, k)],
            setScale: [(u, key) => {
              if (key !== "x" || syncing) return;
              syncing = true;
              for (const other of panels) {
                if (other !== u) other.setScale("x", { min: u.scales.x.min, max: u.scales.x.max });
              }
              syncing = false;
            }],
          },
        },
        [spec.t, c.min, c.max],
        holder,
      );
      u.setScale("x", { min: t0, max: t1 });
      panels.push(u);
    });
    const reset = () => panels[0].setScale("x", { min: t0, max: t1 });
    for (const u of panels) u.over.addEventListener("dblclick", reset);
    tools.appendChild(button("Reset view", "The whole record (or double-click a panel)", reset));
    const hint = document.createElement("span");
    hint.className = "chart-hint";
    hint.textContent = "Drag across a panel to zoom in time; the panels follow together";
    tools.appendChild(hint);
    figure.classList.add("view-live");
    histories[figure.id.replace(/^figure-/, "")] = { panels, marks: spec.marks };
    let resizing = 0;
    globalThis.addEventListener("resize", () => {
      clearTimeout(resizing);
      resizing = setTimeout(
        () => panels.forEach((u) => u.setSize({ width: width(), height: 100 })),
        100,
      );
    });
  });

  // Mode shapes: a play button runs the real part of the shape through one cycle,
  // Re(φ·e^{iθ}) = Re φ·cos θ − Im φ·sin θ, θ over 2π in 1.6 s; pause stops where it is.
  document.querySelectorAll("figure script.shape-data").forEach((source) => {
    const figure = source.closest("figure");
    const svg = figure.querySelector("svg.shape");
    if (svg === null) return;
    const motion = JSON.parse(source.textContent);
    const lines = [...svg.querySelectorAll("line.deformed")];
    const points = [...svg.querySelectorAll("circle.moving")];
    const state = { playing: false, theta: 0, frame: 0, last: 0, place: (theta) => place(theta) };
    const place = (theta) => {
      const c = Math.cos(theta), s = Math.sin(theta);
      const at = motion.base.map((b, i) => [
        b[0] + c * motion.re[i][0] - s * motion.im[i][0],
        b[1] + c * motion.re[i][1] - s * motion.im[i][1],
      ]);
      motion.lines.forEach(([a, b], j) => {
        const line = lines[j];
        if (line === undefined) return;
        line.setAttribute("x1", at[a][0].toFixed(1));
        line.setAttribute("y1", at[a][1].toFixed(1));
        line.setAttribute("x2", at[b][0].toFixed(1));
        line.setAttribute("y2", at[b][1].toFixed(1));
      });
      points.forEach((p, i) => {
        p.setAttribute("cx", at[i][0].toFixed(1));
        p.setAttribute("cy", at[i][1].toFixed(1));
      });
    };
    const step = (now) => {
      if (!state.playing) return;
      if (state.last !== 0) {
        state.theta = (state.theta + (2 * Math.PI * (now - state.last)) / 1600) % (2 * Math.PI);
      }
      state.last = now;
      place(state.theta);
      state.frame = requestAnimationFrame(step);
    };
    const tools = document.createElement("div");
    tools.className = "chart-tools";
    const play = button("Play", "Animate the shape through one cycle, repeated", () => {
      state.playing = !state.playing;
      play.textContent = state.playing ? "Pause" : "Play";
      figure.dataset.playing = String(state.playing);
      if (state.playing) {
        state.last = 0;
        state.frame = requestAnimationFrame(step);
      } else cancelAnimationFrame(state.frame);
    });
    play.className = "shape-play";
    tools.appendChild(play);
    const hint = document.createElement("span");
    hint.className = "chart-hint";
    hint.textContent = "Deformation Re(φ·e^{iωt}) through one cycle, motion exaggerated";
    tools.appendChild(hint);
    figure.insertBefore(tools, figure.firstChild);
    shapes[figure.id.replace(/^figure-/, "")] = state;
  });
})();
