import { useEffect, useRef, useState } from "react";
import type uPlot from "uplot";
import "uplot/dist/uPlot.min.css";

export type ChartSeries = { t: number[]; v: (number | null)[]; soc: (number | null)[] };

function cssVar(name: string, fallback: string) {
  if (typeof document === "undefined") return fallback;
  return getComputedStyle(document.documentElement).getPropertyValue(name).trim() || fallback;
}

/** Bank voltage (left axis) and SoC (right axis) over time, drawn with uPlot. */
export function ReadingChart({ data, label }: { data: ChartSeries; label: string }) {
  const box = useRef<HTMLDivElement>(null);
  const plot = useRef<uPlot | null>(null);
  const [width, setWidth] = useState(0);

  useEffect(() => {
    const el = box.current;
    if (!el) return;
    const ro = new ResizeObserver(() => setWidth(el.clientWidth));
    ro.observe(el);
    setWidth(el.clientWidth);
    return () => ro.disconnect();
  }, []);

  useEffect(() => {
    if (!box.current || width === 0) return;
    let cancelled = false;
    void import("uplot").then(({ default: UPlot }) => {
      if (cancelled || !box.current) return;
      const dawn = cssVar("--color-dawn-400", "#f8b54a");
      const sky = cssVar("--color-night-300", "#a3b2e3");
      const grid = cssVar("--color-night-700", "#1b275c");
      const text = cssVar("--color-night-200", "#c7d1f1");
      const axis = { stroke: text, grid: { stroke: grid, width: 1 }, ticks: { stroke: grid } };
      const opts: uPlot.Options = {
        width,
        height: 240,
        legend: { show: true },
        scales: { x: { time: true }, v: { auto: true }, soc: { range: [0, 100] } },
        axes: [
          { ...axis },
          { ...axis, scale: "v", label: "V", values: (_u, vals) => vals.map((v) => v.toFixed(1)) },
          { ...axis, scale: "soc", side: 1, label: "SoC %", grid: { show: false } },
        ],
        series: [
          {},
          { label: "Bank voltage (V)", scale: "v", stroke: dawn, width: 2, spanGaps: true, value: (_u, v) => (v == null ? "—" : `${v.toFixed(2)} V`) },
          { label: "SoC (%)", scale: "soc", stroke: sky, width: 2, dash: [6, 4], spanGaps: true, value: (_u, v) => (v == null ? "—" : `${v.toFixed(0)} %`) },
        ],
      };
      const aligned: uPlot.AlignedData = [data.t.map((t) => t / 1000), data.v, data.soc];
      plot.current?.destroy();
      plot.current = new UPlot(opts, aligned, box.current);
    });
    return () => {
      cancelled = true;
    };
  }, [data, width]);

  useEffect(() => () => plot.current?.destroy(), []);

  return (
    <figure className="space-y-2">
      <div ref={box} className="w-full overflow-hidden text-night-200" role="img" aria-label={label} />
      <figcaption className="sr-only">{label}</figcaption>
    </figure>
  );
}
