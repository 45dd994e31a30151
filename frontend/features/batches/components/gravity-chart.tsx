import { CartesianGrid, Legend, Line, LineChart, ReferenceLine, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';
import type { BatchDetail } from '../../../../shared/schemas/batches.ts';
import { formatCount, formatDateTime, formatDayMonth, formatTime } from '@/utils/format';

// recharts is heavy: this file is imported only by the batch page's route chunk.

const colours = { readings: '#b0592a', forecast: '#5c564d', target: '#c2850f', stable: '#6b7f3a', grid: '#e3dacb' };
const HOUR = 3_600_000;
const DAY = 24 * HOUR;
const forecastNames = { 'exponential-decay': 'fitted decay', 'linear-trend': 'trend so far' } as const;

/**
 * X-axis ticks: whole days (every few days on long series) labelled "3 Dec", or for less than two
 * days every few hours labelled "14:00". Never two ticks with the same label; recharts then drops
 * whichever would still collide at the chart's width (minTickGap).
 */
export function timeTicks(start: number, end: number): { ticks: number[]; label: (t: number) => string } {
  const span = Math.max(end - start, HOUR);
  const hours = span < 2 * DAY;
  const label = hours ? (t: number) => formatTime(t) : (t: number) => formatDayMonth(t);
  const stepMs = hours ? Math.max(1, Math.ceil(span / HOUR / 8)) * HOUR : Math.max(1, Math.ceil(span / DAY / 10)) * DAY;
  const first = new Date(start);
  if (hours) first.setMinutes(0, 0, 0);
  else first.setHours(0, 0, 0, 0);
  const ticks: number[] = [];
  const seen = new Set<string>();
  for (let t = first.getTime(); t <= end; t += stepMs) {
    if (t < start) continue;
    const text = label(t);
    if (seen.has(text)) continue;
    seen.add(text);
    ticks.push(t);
  }
  if (ticks.length === 0) ticks.push(start);
  return { ticks, label };
}

export interface GravityChartProps {
  batch: BatchDetail;
  height?: number;
}

/** Gravity over time: the readings, the fitted forecast curve (dashed), the target FG and where the gravity became stable. */
export const GravityChart = ({ batch, height = 320 }: GravityChartProps) => {
  const readings = batch.series.map((p) => ({ t: Date.parse(p.takenAt), sg: p.sg }));
  const forecast = (batch.forecast?.curve ?? []).map((p) => ({ t: Date.parse(p.takenAt), forecast: p.sg }));
  if (readings.length === 0) {
    return (
      <p className="rounded-md border border-dashed border-line-strong px-3 py-10 text-center text-sm text-ink-muted">
        No readings yet: the chart appears with the first one.
      </p>
    );
  }
  const values = [...readings.map((r) => r.sg), ...forecast.map((f) => f.forecast), ...(batch.targetFg ? [batch.targetFg] : [])];
  const lo = Math.min(...values);
  const hi = Math.max(...values);
  const pad = Math.max(0.002, (hi - lo) * 0.08);
  const times = [...readings.map((r) => r.t), ...forecast.map((f) => f.t)];
  const showDots = readings.length <= 60;
  const start = Math.min(...times);
  const end = Math.max(...times);
  const { ticks, label } = timeTicks(start, end);
  return (
    <figure className="flex flex-col gap-1" aria-label={`Gravity of ${batch.name} over time`} data-testid="gravity-chart">
      <ResponsiveContainer width="100%" height={height}>
        <LineChart margin={{ top: 12, right: 16, bottom: 4, left: 4 }}>
          <CartesianGrid stroke={colours.grid} strokeDasharray="3 3" />
          <XAxis
            dataKey="t"
            type="number"
            scale="time"
            domain={[start, end]}
            ticks={ticks}
            tickFormatter={label}
            interval="preserveStartEnd"
            minTickGap={12}
            allowDuplicatedCategory={false}
            fontSize={12}
          />
          <YAxis
            type="number"
            domain={[Math.floor((lo - pad) * 1000) / 1000, Math.ceil((hi + pad) * 1000) / 1000]}
            tickFormatter={(v: number) => v.toFixed(3)}
            width={52}
            fontSize={12}
          />
          <Tooltip
            labelFormatter={(t) => formatDateTime(Number(t))}
            formatter={(v, name) => [Number(v).toFixed(4), name === 'forecast' ? 'Forecast' : 'Gravity (SG)']}
          />
          <Legend
            formatter={(name) => (name === 'forecast' ? `Forecast (${batch.forecast ? forecastNames[batch.forecast.model] : 'fit'})` : 'Readings (SG)')}
          />
          {batch.targetFg ? (
            <ReferenceLine
              y={batch.targetFg}
              stroke={colours.target}
              strokeDasharray="6 4"
              label={{ value: `Target FG ${batch.targetFg.toFixed(3)}`, position: 'insideTopRight', fontSize: 11, fill: '#7a4f00' }}
            />
          ) : null}
          {batch.stable.stable && batch.stable.since ? (
            <ReferenceLine
              x={Date.parse(batch.stable.since)}
              stroke={colours.stable}
              label={{ value: 'Stable from here', position: 'insideTopLeft', fontSize: 11, fill: '#4b5a26' }}
            />
          ) : null}
          {forecast.length ? (
            <Line
              data={forecast}
              dataKey="forecast"
              name="forecast"
              stroke={colours.forecast}
              strokeDasharray="5 4"
              dot={false}
              strokeWidth={1.5}
              isAnimationActive={false}
            />
          ) : null}
          <Line data={readings} dataKey="sg" name="sg" stroke={colours.readings} strokeWidth={2} dot={showDots ? { r: 3 } : false} isAnimationActive={false} />
        </LineChart>
      </ResponsiveContainer>
      {batch.series.length < batch.readingsCount ? (
        <figcaption className="text-xs text-ink-muted">
          {formatCount(batch.readingsCount)} readings, drawn as {batch.series.length} averages over equal stretches of time.
        </figcaption>
      ) : null}
    </figure>
  );
};
