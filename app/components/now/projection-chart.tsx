/**
 * The 72-hour projection chart (uPlot). Loaded lazily: it is not part of the Now route's first
 * JavaScript. Colours are read from the palette's CSS variables at draw time, so night mode
 * stays red-only.
 */
import { useEffect, useLayoutEffect, useRef, useState } from "react";
import uPlot from "uplot";
import "uplot/dist/uPlot.min.css";
import type { ChartSeries } from "./now-model";
import { formatClock, formatW } from "./format";

const css = (name: string) => getComputedStyle(document.documentElement).getPropertyValue(name).trim() || "#888";

function withAlpha(color: string, alpha: number): string {
  const m = /^#([0-9a-f]{6})$/i.exec(color);
  if (!m) return color;
  const n = parseInt(m[1]!, 16);
  return `rgba(${(n >> 16) & 255}, ${(n >> 8) & 255}, ${n & 255}, ${alpha})`;
}

function toData(s: ChartSeries): uPlot.AlignedData {
  return [s.t, s.socPct, s.solarW, s.drawW];
}

export default function ProjectionChart({ series, timeZone }: { series: ChartSeries; timeZone: string }) {
  const box = useRef<HTMLDivElement>(null);
  const plot = useRef<uPlot | null>(null);
  const latest = useRef(series);
  latest.current = series;
  const [readout, setReadout] = useState<string | null>(null);

  useEffect(() => {
    const el = box.current;
    if (!el) return;
    const maxW = () => Math.max(100, ...latest.current.solarW, ...latest.current.drawW) * 1.1;
    const opts: uPlot.Options = {
      width: el.clientWidth || 360,
      height: 240,
      padding: [12, 4, 0, 4],
      legend: { show: false },
      cursor: { drag: { x: false, y: false }, points: { size: 8 } },
      scales: { x: { time: true }, pct: { range: [0, 100] }, w: { range: () => [0, maxW()] } },
      axes: [
        {
          stroke: () => css("--color-night-300"),
          grid: { stroke: () => withAlpha(css("--color-night-600"), 0.5), width: 1 },
          ticks: { show: false },
          values: (_u, splits) => splits.map((v) => formatClock(v * 1000, timeZone, true)),
          space: 80,
          font: "12px Atkinson Hyperlegible, sans-serif",
        },
        {
          scale: "pct",
          stroke: () => css("--color-night-300"),
          grid: { stroke: () => withAlpha(css("--color-night-600"), 0.5), width: 1 },
          ticks: { show: false },
          values: (_u, splits) => splits.map((v) => `${v} %`),
          size: 48,
          font: "12px Atkinson Hyperlegible, sans-serif",
        },
        {
          scale: "w",
          side: 1,
          stroke: () => css("--color-night-300"),
          grid: { show: false },
          ticks: { show: false },
          values: (_u, splits) => splits.map((v) => `${Math.round(v)} W`),
          size: 56,
          font: "12px Atkinson Hyperlegible, sans-serif",
        },
      ],
      series: [
        {},
        { label: "SoC", scale: "pct", stroke: () => css("--color-dawn-400"), width: 3, fill: () => withAlpha(css("--color-dawn-600"), 0.18) },
        { label: "Solar", scale: "w", stroke: () => css("--color-leaf-400"), width: 1.5, fill: () => withAlpha(css("--color-leaf-400"), 0.12) },
        { label: "Draw", scale: "w", stroke: () => css("--color-ember-300"), width: 1.5, dash: [6, 4] },
      ],
      hooks: {
        drawClear: [
          (u) => {
            const s = latest.current;
            const ctx = u.ctx;
            ctx.save();
            ctx.fillStyle = withAlpha(css("--color-night-800"), 0.9);
            for (const [a, b] of s.nights) {
              const x0 = u.valToPos(a, "x", true);
              const x1 = u.valToPos(b, "x", true);
              ctx.fillRect(x0, u.bbox.top, x1 - x0, u.bbox.height);
            }
            ctx.restore();
          },
        ],
        draw: [
          (u) => {
            const s = latest.current;
            const ctx = u.ctx;
            ctx.save();
            const line = (pct: number, color: string, dash: number[]) => {
              const y = u.valToPos(pct, "pct", true);
              ctx.strokeStyle = color;
              ctx.setLineDash(dash);
              ctx.lineWidth = 2 * devicePixelRatio;
              ctx.beginPath();
              ctx.moveTo(u.bbox.left, y);
              ctx.lineTo(u.bbox.left + u.bbox.width, y);
              ctx.stroke();
            };
            line(s.stopSocPct, css("--color-ember-500"), [8 * devicePixelRatio, 6 * devicePixelRatio]);
            if (Math.abs(s.cutoffSocPct - s.stopSocPct) > 0.5) line(s.cutoffSocPct, css("--color-ember-300"), [2 * devicePixelRatio, 4 * devicePixelRatio]);
            if (s.runwayEnd !== null) {
              const x = u.valToPos(s.runwayEnd, "x", true);
              ctx.setLineDash([]);
              ctx.strokeStyle = css("--color-ember-500");
              ctx.lineWidth = 3 * devicePixelRatio;
              ctx.beginPath();
              ctx.moveTo(x, u.bbox.top);
              ctx.lineTo(x, u.bbox.top + u.bbox.height);
              ctx.stroke();
              ctx.fillStyle = css("--color-ember-500");
              ctx.font = `bold ${12 * devicePixelRatio}px Atkinson Hyperlegible, sans-serif`;
              ctx.fillText("floor", Math.min(x + 4 * devicePixelRatio, u.bbox.left + u.bbox.width - 40 * devicePixelRatio), u.bbox.top + 14 * devicePixelRatio);
            }
            ctx.restore();
          },
        ],
        setCursor: [
          (u) => {
            const i = u.cursor.idx;
            if (i === null || i === undefined) return;
            const s = latest.current;
            setReadout(
              `${formatClock(s.t[i]! * 1000, timeZone)} · SoC ${s.socPct[i]!.toFixed(0)} % · solar ${formatW(s.solarW[i]!)} · draw ${formatW(s.drawW[i]!)}`,
            );
          },
        ],
      },
    };
    const u = new uPlot(opts, toData(latest.current), el);
    plot.current = u;
    const ro = new ResizeObserver(() => u.setSize({ width: el.clientWidth, height: 240 }));
    ro.observe(el);
    const mo = new MutationObserver(() => u.redraw(false));
    mo.observe(document.documentElement, { attributes: true, attributeFilter: ["class"] });
    // Tap-to-read on touch screens: move the cursor to the touched point.
    const over = u.over;
    const onPointer = (e: PointerEvent) => {
      const r = over.getBoundingClientRect();
      u.setCursor({ left: e.clientX - r.left, top: e.clientY - r.top });
    };
    over.addEventListener("pointerdown", onPointer);
    over.addEventListener("pointermove", onPointer);
    return () => {
      over.removeEventListener("pointerdown", onPointer);
      over.removeEventListener("pointermove", onPointer);
      ro.disconnect();
      mo.disconnect();
      u.destroy();
      plot.current = null;
    };
  }, [timeZone]);

  useLayoutEffect(() => {
    const u = plot.current;
    if (!u) return;
    u.setData(toData(series));
    performance.mark("now:chart");
  }, [series]);

  return (
    <div>
      <div ref={box} className="w-full touch-pan-y" aria-hidden="true" data-testid="projection-chart" />
      <p className="tabular min-h-6 text-sm text-night-200" aria-hidden="true">
        {readout ?? "Tap the chart to read a moment."}
      </p>
    </div>
  );
}
