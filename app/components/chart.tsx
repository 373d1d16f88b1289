// uPlot charts, drawn in the browser only, from columnar JSON fetched from the series API route.
import { useEffect, useRef, useState } from "react";
import type uPlot from "uplot";
import "uplot/dist/uPlot.min.css";

export const TEMP_COLOURS = { cold: "#3b6ea8", cool: "#6aa3c8", mild: "#9bb88a", warm: "#e0a04a", hot: "#c4472f" };

export type ChartSpec = {
  title: string;
  height?: number;
  unit: "C" | "F";
  /** Hide uPlot's own legend when the page draws a labelled key instead. */
  legend?: boolean;
  build: (
    data: Record<string, (number | null)[]>,
    unit: "C" | "F",
  ) => { data: uPlot.AlignedData; series: uPlot.Series[]; axes?: uPlot.Axis[]; bands?: uPlot.Band[]; scales?: uPlot.Scales };
};

export function useSeries(url: string) {
  const [state, setState] = useState<{ data?: Record<string, (number | null)[]>; error?: string }>({});
  useEffect(() => {
    let alive = true;
    fetch(url, { headers: { Accept: "application/json" } })
      .then((r) => (r.ok ? r.json() : Promise.reject(new Error(`HTTP ${r.status}`))))
      .then((d) => alive && setState({ data: d }))
      .catch((e: Error) => alive && setState({ error: e.message }));
    return () => {
      alive = false;
    };
  }, [url]);
  return state;
}

export function Chart({ spec, data, testId }: { spec: ChartSpec; data?: Record<string, (number | null)[]>; testId?: string }) {
  const ref = useRef<HTMLDivElement>(null);
  useEffect(() => {
    if (!data || !ref.current) return;
    let plot: uPlot | undefined;
    let observer: ResizeObserver | undefined;
    let cancelled = false;
    import("uplot").then(({ default: UPlot }) => {
      if (cancelled || !ref.current) return;
      const built = spec.build(data, spec.unit);
      const width = ref.current.clientWidth || 600;
      const started = performance.now();
      plot = new UPlot(
        {
          width,
          height: spec.height ?? 240,
          series: [{}, ...built.series],
          bands: built.bands,
          scales: built.scales,
          axes: built.axes ?? [
            { stroke: "#6f675c", grid: { stroke: "#e4dccd" }, ticks: { stroke: "#e4dccd" } },
            { stroke: "#6f675c", grid: { stroke: "#e4dccd" }, ticks: { stroke: "#e4dccd" }, label: `°${spec.unit}`, size: 50 },
          ],
          legend: { show: spec.legend ?? true },
          cursor: { drag: { x: false, y: false } },
        },
        built.data,
        ref.current,
      );
      ref.current.dataset.drawMs = (performance.now() - started).toFixed(1);
      observer = new ResizeObserver(() => {
        if (plot && ref.current) plot.setSize({ width: ref.current.clientWidth, height: spec.height ?? 240 });
      });
      observer.observe(ref.current);
    });
    return () => {
      cancelled = true;
      observer?.disconnect();
      plot?.destroy();
    };
  }, [data, spec]);
  return (
    <figure>
      <figcaption className="mb-2 text-sm font-medium">{spec.title}</figcaption>
      <div ref={ref} className="w-full min-h-[120px]" data-testid={testId} />
    </figure>
  );
}
