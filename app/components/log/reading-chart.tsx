import { useEffect, useRef, useState } from "react";
import type uPlot from "uplot";
import "uplot/dist/uPlot.min.css";
import { formatDayMonth, formatShortDateTime, formatTime, type TimeSettings } from "~/lib/datetime";
import { tickLabels, timeRange, voltageRange } from "~/logbook/chart-axes";

export type ChartSeries = { t: number[]; v: (number | null)[]; soc: (number | null)[] };

function cssVar(name: string, fallback: string) {
  if (typeof document === "undefined") return fallback;
  return getComputedStyle(document.documentElement).getPropertyValue(name).trim() || fallback;
}

const finite = (xs: (number | null)[]) => xs.filter((x): x is number => x !== null && Number.isFinite(x));

/**
 * Bank voltage (left axis) and SoC (right axis) over time, drawn with uPlot in the rig's time
 * zone. The legend under the chart always shows values: the latest reading, or the one under
 * the pointer.
 */
export function ReadingChart({ data, label, time }: { data: ChartSeries; label: string; time: TimeSettings }) {
  const box = useRef<HTMLDivElement>(null);
  const plot = useRef<uPlot | null>(null);
  const [width, setWidth] = useState(0);
  const [idx, setIdx] = useState<number | null>(null);
  const [axes, setAxes] = useState<{ x: string; v: string; vTicks: string; xTicks: string }>({ x: "", v: "", vTicks: "", xTicks: "" });

  useEffect(() => {
    const el = box.current;
    if (!el) return;
    const ro = new ResizeObserver(() => setWidth(el.clientWidth));
    ro.observe(el);
    setWidth(el.clientWidth);
    return () => ro.disconnect();
  }, []);

  useEffect(() => setIdx(null), [data]);

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
      const vs = finite(data.v);
      const vRange = voltageRange(vs.length ? Math.min(...vs) : null, vs.length ? Math.max(...vs) : null);
      const ts = data.t.map((t) => t / 1000);
      const xRange = timeRange(ts.length ? ts[0]! : null, ts.length ? ts[ts.length - 1]! : null);
      let vTicks: string[] = [];
      let xTicks: string[] = [];
      const opts: uPlot.Options = {
        width,
        height: 240,
        legend: { show: false },
        tzDate: (s) => UPlot.tzDate(new Date(s * 1000), time.timeZone),
        scales: { x: { time: true, range: () => xRange }, v: { range: () => vRange }, soc: { range: [0, 100] } },
        axes: [
          {
            ...axis,
            // The app's own date style and the person's clock, in the rig's zone.
            values: (_u, splits, _i, _space, incr) => (xTicks = splits.map((s) => (incr < 86_400 ? formatTime(s * 1000, time) : formatDayMonth(s * 1000, time)))),
          },
          {
            ...axis,
            scale: "v",
            label: "V",
            values: (_u, splits) => (vTicks = tickLabels(splits)),
          },
          { ...axis, scale: "soc", side: 1, label: "SoC %", grid: { show: false } },
        ],
        series: [
          {},
          { label: "Bank voltage (V)", scale: "v", stroke: dawn, width: 2, spanGaps: true, points: { show: true, size: 6 } },
          { label: "SoC (%)", scale: "soc", stroke: sky, width: 2, dash: [6, 4], spanGaps: true, points: { show: true, size: 6 } },
        ],
        hooks: {
          setCursor: [(u) => setIdx(u.cursor.idx ?? null)],
          draw: [
            (u) =>
              setAxes({
                x: `${u.scales.x!.min}..${u.scales.x!.max}`,
                v: `${u.scales.v!.min}..${u.scales.v!.max}`,
                vTicks: vTicks.join(" "),
                xTicks: xTicks.join(" | "),
              }),
          ],
        },
      };
      plot.current?.destroy();
      plot.current = new UPlot(opts, [ts, data.v, data.soc], box.current);
    });
    return () => {
      cancelled = true;
    };
  }, [data, width, time]);

  useEffect(() => () => plot.current?.destroy(), []);

  const at = idx ?? data.t.length - 1;
  const v = data.v[at];
  const soc = data.soc[at];
  return (
    <figure className="space-y-2" data-x-range={axes.x} data-v-range={axes.v} data-v-ticks={axes.vTicks} data-x-ticks={axes.xTicks}>
      <div ref={box} className="w-full overflow-hidden text-night-200" role="img" aria-label={label} />
      <figcaption className="sr-only">{label}</figcaption>
      {at >= 0 && data.t[at] !== undefined ? (
        <dl data-chart-legend className="flex flex-wrap gap-x-4 gap-y-1 text-sm tabular">
          <div className="flex gap-1">
            <dt className="text-night-300">{idx === null ? "Latest" : "At"}</dt>
            <dd className="font-bold">{formatShortDateTime(data.t[at]!, time)}</dd>
          </div>
          <div className="flex items-center gap-1">
            <dt className="flex items-center gap-1 text-night-300">
              <span aria-hidden="true" className="inline-block h-0.5 w-5 bg-dawn-400" />
              Bank voltage
            </dt>
            <dd className="font-bold">{v === null || v === undefined ? "—" : `${v.toFixed(2)} V`}</dd>
          </div>
          <div className="flex items-center gap-1">
            <dt className="flex items-center gap-1 text-night-300">
              <span aria-hidden="true" className="inline-block w-5 border-t-2 border-dashed border-night-300" />
              SoC
            </dt>
            <dd className="font-bold">{soc === null || soc === undefined ? "—" : `${soc.toFixed(0)} %`}</dd>
          </div>
        </dl>
      ) : null}
    </figure>
  );
}
