/**
 * X-y charts with uPlot's mode 2 (each series has its own x values, in any order, so a closed pressure-volume loop
 * draws as a loop): shaded x-bands with a hatch (so a band is not told by colour alone), labelled horizontal
 * reference lines, and labelled marker points with distinct shapes. ChartColours come from the theme's CSS custom
 * properties and follow a theme change; the chart follows its container's width and is destroyed on unmount. The
 * caller gives the text alternative (summary and table) as children.
 */

import type { ComponentChildren } from 'preact';
import { useEffect, useRef } from 'preact/hooks';
import uPlot from 'uplot';
import { type ChartColours, readChartColours, useThemeVersion } from './theme';
import 'uplot/dist/uPlot.min.css';
import './trend-chart.css';
import './xy-chart.css';

export interface XYSeries {
  label: string;
  x: number[];
  y: number[];
  /** Dash pattern in CSS pixels; solid when absent. */
  dash?: number[];
}

export interface XYBand {
  from: number;
  to: number;
  label: string;
}

export interface XYLine {
  value: number;
  label: string;
  kind: 'limit' | 'reference';
}

export interface XYMarker {
  x: number;
  y: number;
  label: string;
  shape: 'circle' | 'diamond';
}

export interface XYChartProps {
  testId: string;
  title: string;
  xLabel: string;
  yLabel: string;
  series: XYSeries[];
  bands?: XYBand[];
  lines?: XYLine[];
  markers?: XYMarker[];
  xRange?: [number, number];
  /** Tick values on the x axis, when the caller wants fixed ones (e.g. every 90° of crank angle). */
  xTicks?: number[];
  children?: ComponentChildren;
}

const heightFor = (width: number) => Math.round(Math.min(420, Math.max(260, width * 0.55)));
const SERIES_DASH: number[][] = [[], [8, 4], [2, 4], [12, 4, 2, 4]];
const tick = (v: number) => String(Number(v.toPrecision(6)));

function range(values: number[]): [number, number] {
  const finite = values.filter(Number.isFinite);
  const lo = finite.length ? Math.min(...finite) : 0;
  const hi = finite.length ? Math.max(...finite) : 1;
  const pad = hi > lo ? (hi - lo) * 0.08 : Math.max(1, Math.abs(hi) * 0.05);
  return [lo - pad, hi + pad];
}

function build(
  props: XYChartProps,
  colours: ChartColours,
): { options: Omit<uPlot.Options, 'width' | 'height'>; data: uPlot.AlignedData } {
  const font = `16px ${colours.font}`;
  const axis = {
    stroke: colours.text,
    font,
    labelFont: font,
    grid: { stroke: colours.border, width: 0.5 },
    ticks: { stroke: colours.border, width: 1 },
    values: (_u: uPlot, splits: number[]) => splits.map(tick),
  };
  const xs = props.series.flatMap((s) => s.x);
  const ys = [
    ...props.series.flatMap((s) => s.y),
    ...(props.lines ?? []).map((l) => l.value),
    ...(props.markers ?? []).map((m) => m.y),
  ];
  const xRange = props.xRange ?? range(xs);
  const yRange = range(ys);
  const series: uPlot.Series[] = [
    {},
    ...props.series.map((s, k): uPlot.Series => {
      const colour = colours.series[k % colours.series.length] ?? colours.text;
      return {
        label: s.label,
        stroke: colour,
        width: 2.5,
        dash: s.dash ?? SERIES_DASH[k % SERIES_DASH.length] ?? [],
        paths: uPlot.paths.linear?.(),
        points: { show: false },
        facets: [
          { scale: 'x', auto: false },
          { scale: 'y', auto: false },
        ],
      } as uPlot.Series;
    }),
  ];
  const shadeBands = (u: uPlot) => {
    const bands = props.bands ?? [];
    if (!bands.length) return;
    const ctx = u.ctx;
    const ratio = uPlot.pxRatio;
    const { top, height } = u.bbox;
    ctx.save();
    for (const band of bands) {
      const x0 = u.valToPos(band.from, 'x', true);
      const x1 = u.valToPos(band.to, 'x', true);
      ctx.globalAlpha = 0.18;
      ctx.fillStyle = colours.band;
      ctx.fillRect(x0, top, x1 - x0, height);
      // Diagonal hatch, so the band reads without colour.
      ctx.globalAlpha = 0.45;
      ctx.strokeStyle = colours.band;
      ctx.lineWidth = 1 * ratio;
      ctx.beginPath();
      ctx.rect(x0, top, x1 - x0, height);
      ctx.clip();
      for (let x = x0 - height; x < x1; x += 14 * ratio) {
        ctx.moveTo(x, top + height);
        ctx.lineTo(x + height, top);
      }
      ctx.stroke();
      ctx.restore();
      ctx.save();
    }
    ctx.restore();
  };
  const drawOverlays = (u: uPlot) => {
    const ctx = u.ctx;
    const ratio = uPlot.pxRatio;
    const { left, top, width, height } = u.bbox;
    ctx.save();
    ctx.font = `${Math.round(15 * ratio)}px ${colours.font}`;
    ctx.textBaseline = 'middle';
    const drawn: string[] = [];
    for (const line of props.lines ?? []) {
      const y = Math.round(u.valToPos(line.value, 'y', true));
      if (y < top || y > top + height) continue;
      const colour = line.kind === 'limit' ? colours.alarm : colours.accent;
      ctx.strokeStyle = colour;
      ctx.lineWidth = 2 * ratio;
      ctx.setLineDash((line.kind === 'limit' ? [14, 6] : [4, 5]).map((d) => d * ratio));
      ctx.beginPath();
      ctx.moveTo(left, y);
      ctx.lineTo(left + width, y);
      ctx.stroke();
      ctx.setLineDash([]);
      const textWidth = ctx.measureText(line.label).width;
      const pad = 4 * ratio;
      const boxTop = y - 18 * ratio - pad;
      ctx.fillStyle = colours.bg;
      ctx.fillRect(left + width - textWidth - 3 * pad, boxTop, textWidth + 2 * pad, 18 * ratio);
      ctx.fillStyle = colour;
      ctx.fillText(line.label, left + width - textWidth - 2 * pad, boxTop + 9 * ratio);
      drawn.push(line.label);
    }
    for (const marker of props.markers ?? []) {
      const x = u.valToPos(marker.x, 'x', true);
      const y = u.valToPos(marker.y, 'y', true);
      const size = 8 * ratio;
      ctx.fillStyle = marker.shape === 'diamond' ? colours.alarm : colours.accent;
      ctx.strokeStyle = colours.bg;
      ctx.lineWidth = 2 * ratio;
      ctx.beginPath();
      if (marker.shape === 'diamond') {
        ctx.moveTo(x, y - size);
        ctx.lineTo(x + size, y);
        ctx.lineTo(x, y + size);
        ctx.lineTo(x - size, y);
        ctx.closePath();
      } else ctx.arc(x, y, size * 0.8, 0, 2 * Math.PI);
      ctx.fill();
      ctx.stroke();
      ctx.fillStyle = colours.text;
      const textWidth = ctx.measureText(marker.label).width;
      const tx = Math.min(x + size * 1.5, left + width - textWidth - 4 * ratio);
      ctx.fillText(marker.label, tx, y - size * 1.8);
      drawn.push(marker.label);
    }
    ctx.restore();
    // What was drawn on the canvas, for the browser tests (a canvas has no DOM to inspect).
    u.root.dataset.drawn = drawn.join('|');
  };
  const xAxis: uPlot.Axis = { ...axis, label: props.xLabel, space: 70 };
  if (props.xTicks) {
    const ticks = props.xTicks;
    xAxis.splits = () => ticks;
  }
  return {
    options: {
      mode: 2,
      series,
      axes: [xAxis, { ...axis, label: props.yLabel, size: 80 }],
      scales: { x: { time: false, range: () => xRange }, y: { range: () => yRange } },
      cursor: { show: false },
      legend: { live: false },
      hooks: { drawAxes: [shadeBands], draw: [drawOverlays] },
    },
    data: [null, ...props.series.map((s) => [s.x, s.y])] as unknown as uPlot.AlignedData,
  };
}

/** One x-y chart with its text alternative (children) under it. */
export function XYChart(props: XYChartProps) {
  const host = useRef<HTMLDivElement>(null);
  const theme = useThemeVersion();
  useEffect(() => {
    const element = host.current;
    if (!element || !props.series.some((s) => s.x.length > 0)) return;
    const width = Math.max(280, Math.floor(element.clientWidth));
    const { options, data } = build(props, readChartColours(element, 4));
    const plot = new uPlot({ ...options, width, height: heightFor(width) }, data, element);
    const observer = new ResizeObserver((entries) => {
      const next = Math.floor(entries[0]?.contentRect.width ?? 0);
      if (next >= 200 && next !== plot.width) plot.setSize({ width: next, height: heightFor(next) });
    });
    observer.observe(element);
    return () => {
      observer.disconnect();
      plot.destroy();
    };
  }, [props.series, props.bands, props.lines, props.markers, theme]);
  return (
    <figure class="trend-chart xy-chart" data-testid={props.testId}>
      <figcaption class="trend-chart__title">{props.title}</figcaption>
      <div class="trend-chart__canvas" ref={host} aria-hidden="true" />
      {props.children}
    </figure>
  );
}
