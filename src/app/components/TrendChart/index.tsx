/**
 * Trend charts (the only place uPlot is used). The canvas is drawn in the theme's colours, read from the CSS custom
 * properties, and redrawn when the theme changes; limits are drawn as labelled lines with a dash pattern per level,
 * so nothing depends on colour alone. Every chart carries its text alternative: a summary sentence and a table of
 * the readings.
 */

import type { RefObject } from 'preact';
import { useEffect, useRef, useState } from 'preact/hooks';
import uPlot from 'uplot';
import { type ChartColours, readChartColours, useThemeVersion } from './theme';
import 'uplot/dist/uPlot.min.css';
import './trend-chart.css';
import type { ChartLimit, LimitLevel, PointTrend } from '../../models/trend';
import { showValue } from '../../models/trend';

/** Dash patterns (CSS pixels) per limit level: watch dotted, alarm long dashes, trip dash-dot and thicker. */
const LIMIT_DASH: Record<LimitLevel, number[]> = { watch: [3, 5], alarm: [14, 6], trip: [18, 5, 4, 5] };
const LIMIT_WIDTH: Record<LimitLevel, number> = { watch: 2, alarm: 2, trip: 3 };
const LEVEL_WORDS: Record<LimitLevel, string> = { watch: 'Watch', alarm: 'Alarm', trip: 'Trip' };
/** Where each level's label sits along its line, so labels of close limits do not cover each other. */
const LABEL_AT: Record<LimitLevel, number> = { watch: 0, alarm: 0.36, trip: 0.68 };
const PROJECTION_DASH = [10, 8];
/** Series patterns for several lines on one chart: colour, dash and marker size all differ. */
const SERIES_DASH: number[][] = [[], [8, 4], [2, 4], [12, 4, 2, 4], [], [8, 4], [2, 4], [12, 4, 2, 4]];
const SERIES_COUNT = 8;

const heightFor = (width: number) => Math.round(Math.min(440, Math.max(260, width * 0.55)));

type Build = (colours: ChartColours) => { options: Omit<uPlot.Options, 'width' | 'height'>; data: uPlot.AlignedData };

/** Builds the plot in the container, follows its width, rebuilds on a theme change, and destroys it on unmount. */
function useUplot(host: RefObject<HTMLDivElement | null>, build: Build | null, key: unknown): void {
  const theme = useThemeVersion();
  useEffect(() => {
    const element = host.current;
    if (!element || !build) return;
    const width = Math.max(280, Math.floor(element.clientWidth));
    const { options, data } = build(readChartColours(element, SERIES_COUNT));
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
  }, [key, theme]);
}

/** Tick labels for the time axis in the tablet's own date style: days over a long span, hours over a short one. */
function timeTicks(splits: number[]): string[] {
  const span = (splits.at(-1) ?? 0) - (splits[0] ?? 0);
  const short = span < 2 * 86_400;
  return splits.map((s) =>
    new Date(s * 1000).toLocaleString(
      [],
      short ? { hour: '2-digit', minute: '2-digit' } : { day: 'numeric', month: 'short' },
    ),
  );
}

function axes(colours: ChartColours, unit: string): uPlot.Axis[] {
  const font = `16px ${colours.font}`;
  const common = {
    stroke: colours.text,
    font,
    labelFont: font,
    grid: { stroke: colours.border, width: 0.5 },
    ticks: { stroke: colours.border, width: 1 },
  };
  return [
    { ...common, space: 90, values: (_u, splits) => timeTicks(splits) },
    {
      ...common,
      label: unit,
      size: 72,
      values: (_u, splits) => splits.map((v) => String(Number(v.toPrecision(6)))),
    },
  ];
}

/** The range that shows every value, limit and projection end, with a little room. */
function yRange(values: Array<number | null | undefined>): uPlot.Range.Function {
  const finite = values.filter((v): v is number => typeof v === 'number' && Number.isFinite(v));
  const lo = finite.length ? Math.min(...finite) : 0;
  const hi = finite.length ? Math.max(...finite) : 1;
  const pad = hi > lo ? (hi - lo) * 0.08 : Math.max(1, Math.abs(hi) * 0.05);
  return () => [lo - pad, hi + pad];
}

function drawLimits(limits: readonly ChartLimit[], unit: string, colours: ChartColours) {
  return (u: uPlot) => {
    const ctx = u.ctx;
    const ratio = uPlot.pxRatio;
    const { left, top, width, height } = u.bbox;
    ctx.save();
    ctx.font = `${Math.round(15 * ratio)}px ${colours.font}`;
    const drawn: string[] = [];
    for (const limit of limits) {
      const y = Math.round(u.valToPos(limit.value, 'y', true));
      if (y < top || y > top + height) continue;
      const colour = limit.level === 'watch' ? colours.watch : colours.alarm;
      ctx.strokeStyle = colour;
      ctx.lineWidth = LIMIT_WIDTH[limit.level] * ratio;
      ctx.setLineDash(LIMIT_DASH[limit.level].map((d) => d * ratio));
      ctx.beginPath();
      ctx.moveTo(left, y);
      ctx.lineTo(left + width, y);
      ctx.stroke();
      ctx.setLineDash([]);
      const text = `${LEVEL_WORDS[limit.level]} ${limit.side} ${showValue(limit.value, unit)}`;
      const textWidth = ctx.measureText(text).width;
      const pad = 4 * ratio;
      const lineHeight = 18 * ratio;
      const x = Math.min(left + width - textWidth - pad * 2, left + pad + width * LABEL_AT[limit.level]);
      // High limits are labelled above their line, low limits below, on a plate of the background colour.
      const boxTop = limit.side === 'high' ? y - lineHeight - pad : y + pad;
      ctx.fillStyle = colours.bg;
      ctx.fillRect(x - pad, boxTop, textWidth + pad * 2, lineHeight);
      ctx.fillStyle = colour;
      ctx.textAlign = 'left';
      ctx.textBaseline = 'middle';
      ctx.fillText(text, x, boxTop + lineHeight / 2);
      drawn.push(text);
    }
    ctx.restore();
    // Which limit lines are on the canvas, for the browser tests (a canvas has no DOM to inspect).
    u.root.dataset.drawnLimits = drawn.join('|');
  };
}

const when = (seconds: number) =>
  new Date(seconds * 1000).toLocaleString([], { dateStyle: 'medium', timeStyle: 'short' });

/** The readings as a table, built only when the person opens it (a point may have thousands of readings). */
function ReadingsTable(props: {
  rows: Array<{ t: number; label?: string; value: number | null }>;
  unit: string;
  caption: string;
}) {
  const [open, setOpen] = useState(false);
  const several = props.rows.some((row) => row.label !== undefined);
  return (
    <details
      class="trend-chart__details"
      onToggle={(event) => setOpen((event.currentTarget as HTMLDetailsElement).open)}
    >
      <summary>Readings as a table ({props.rows.length})</summary>
      {open ? (
        <div class="trend-chart__table-wrap">
          <table class="trend-chart__table">
            <caption>{props.caption}</caption>
            <thead>
              <tr>
                <th scope="col">Time</th>
                {several ? <th scope="col">Point</th> : null}
                <th scope="col">Value</th>
              </tr>
            </thead>
            <tbody>
              {props.rows.map((row, index) => (
                <tr key={`${row.t}-${row.label ?? ''}-${index}`}>
                  <td>{when(row.t)}</td>
                  {several ? <td>{row.label}</td> : null}
                  <td>{row.value === null ? 'skipped' : showValue(row.value, props.unit)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      ) : null}
    </details>
  );
}

/** One check point over time with its limits and, when the trend heads for one, the projection to it. */
export function TrendChart(props: { trend: PointTrend; title?: string }) {
  const { trend } = props;
  const host = useRef<HTMLDivElement>(null);
  const build: Build | null = trend.times.length
    ? (colours) => {
        const line = trend.projection?.line ?? null;
        // Aligned data: the reading times plus the projection's end, ascending.
        const xs = [...new Set([...trend.times, ...(line ? [line[0][0], line[1][0]] : [])])].sort((a, b) => a - b);
        const at = new Map(trend.times.map((t, k) => [t, trend.values[k] ?? null]));
        const readings = xs.map((x) => (at.has(x) ? (at.get(x) ?? null) : null));
        const projection = xs.map((x) =>
          line ? (x === line[0][0] ? line[0][1] : x === line[1][0] ? line[1][1] : null) : null,
        );
        const series: uPlot.Series[] = [
          {},
          {
            label: trend.point.label,
            stroke: colours.text,
            width: 2,
            spanGaps: false,
            points: { show: true, size: 7, stroke: colours.text, fill: colours.bg },
            value: (_u, v) => (v === null ? '–' : showValue(v, trend.unit)),
          },
        ];
        const data: uPlot.AlignedData = [xs, readings];
        if (line) {
          series.push({
            label: 'At this rate',
            stroke: colours.accent,
            width: 3,
            dash: PROJECTION_DASH,
            spanGaps: true,
            points: { show: false },
            value: (_u, v) => (v === null ? '–' : showValue(v, trend.unit)),
          });
          data.push(projection);
        }
        return {
          options: {
            series,
            axes: axes(colours, trend.unit),
            scales: {
              x: { time: true },
              y: { range: yRange([...trend.values, ...trend.limits.map((l) => l.value), line?.[1][1]]) },
            },
            cursor: { points: { size: 10 } },
            hooks: { draw: [drawLimits(trend.limits, trend.unit, colours)] },
          },
          data,
        };
      }
    : null;
  useUplot(host, build, trend);
  return (
    <figure class="trend-chart" data-testid="trend-chart">
      {props.title ? <figcaption class="trend-chart__title">{props.title}</figcaption> : null}
      <div class="trend-chart__canvas" data-testid="trend-canvas" ref={host} aria-hidden="true" />
      <p class="trend-chart__summary">
        <span data-testid="trend-summary">{trend.summary}</span>
        {trend.limits.length ? (
          <span data-testid="trend-limits">
            {' '}
            Limits:{' '}
            {trend.limits.map((l) => `${LEVEL_WORDS[l.level]} ${l.side} ${showValue(l.value, trend.unit)}`).join(', ')}.
          </span>
        ) : null}
        {trend.projection ? (
          <>
            {' '}
            <strong data-testid="trend-projection">{trend.projection.words}</strong>
          </>
        ) : null}
      </p>
      <ReadingsTable
        rows={trend.times.map((t, k) => ({ t, value: trend.values[k] ?? null }))}
        unit={trend.unit}
        caption={`${trend.point.label}, in ${trend.unit || 'its own unit'}`}
      />
    </figure>
  );
}

export interface ChartSeries {
  label: string;
  /** Seconds since the epoch, ascending. */
  times: number[];
  /** In `unit`; null where skipped. */
  values: Array<number | null>;
}

/** Several series on one chart with a legend, e.g. the valve covers of one cylinder, or bearings with oil supply. */
export function MultiTrendChart(props: { series: ChartSeries[]; unit: string; summary: string; title?: string }) {
  const { series, unit } = props;
  const host = useRef<HTMLDivElement>(null);
  const any = series.some((s) => s.times.length > 0);
  const build: Build | null = any
    ? (colours) => {
        const xs = [...new Set(series.flatMap((s) => s.times))].sort((a, b) => a - b);
        const data: uPlot.AlignedData = [
          xs,
          ...series.map((s) => {
            const at = new Map(s.times.map((t, k) => [t, s.values[k] ?? null]));
            return xs.map((x) => at.get(x) ?? null);
          }),
        ];
        const lines: uPlot.Series[] = [
          {},
          ...series.map((s, k): uPlot.Series => {
            const colour = colours.series[k % SERIES_COUNT] ?? colours.text;
            return {
              label: s.label,
              stroke: colour,
              width: 2,
              dash: SERIES_DASH[k % SERIES_DASH.length] ?? [],
              spanGaps: true,
              points: { show: true, size: 5 + (k % 4) * 2, stroke: colour, fill: colours.bg },
              value: (_u, v) => (v === null ? '–' : showValue(v, unit)),
            };
          }),
        ];
        return {
          options: {
            series: lines,
            axes: axes(colours, unit),
            scales: { x: { time: true }, y: { range: yRange(series.flatMap((s) => s.values)) } },
            cursor: { points: { size: 10 } },
          },
          data,
        };
      }
    : null;
  useUplot(host, build, series);
  const rows = series
    .flatMap((s) => s.times.map((t, k) => ({ t, label: s.label, value: s.values[k] ?? null })))
    .sort((a, b) => a.t - b.t);
  return (
    <figure class="trend-chart trend-chart--multi" data-testid="trend-chart">
      {props.title ? <figcaption class="trend-chart__title">{props.title}</figcaption> : null}
      <div class="trend-chart__canvas" data-testid="trend-canvas" ref={host} aria-hidden="true" />
      <p class="trend-chart__summary" data-testid="trend-summary">
        {props.summary}
      </p>
      <ReadingsTable rows={rows} unit={unit} caption={`${props.title ?? 'Readings'}, in ${unit || 'their own unit'}`} />
    </figure>
  );
}
