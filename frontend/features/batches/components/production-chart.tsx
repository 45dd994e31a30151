import { Bar, BarChart, CartesianGrid, Legend, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';
import type { ProductionMonth } from '../../../../shared/schemas/batches.ts';
import { formatMonth } from '@/utils/format';

// The palette's hop green (what came in), copper (what the co-op holds) and amber (what went out).
const colours = { brewed: '#6b7f3a', held: '#b0592a', out: '#c2850f' } as const;

const monthLabel = (month: string) => formatMonth(month, 'short');

/**
 * Month-end inventory as bars, with what was brewed and what went out (removals and losses) beside
 * each month. The table under it holds the same figures for screen readers and for reading exactly.
 */
export const ProductionChart = ({ months }: { months: ProductionMonth[] }) => {
  const data = months.map((m) => ({
    month: monthLabel(m.month),
    brewed: m.producedLiters,
    held: m.closing.totalLiters,
    out: Number((m.removals.totalLiters + m.losses.totalLiters).toFixed(2)),
  }));
  return (
    <figure className="rounded-md border border-line bg-surface p-3" role="img" aria-label="Month-end inventory, brewed and out, per month">
      <div className="h-60 w-full" aria-hidden="true">
        <ResponsiveContainer width="100%" height="100%">
          <BarChart accessibilityLayer={false} data={data} margin={{ top: 8, right: 8, bottom: 0, left: 8 }}>
            <CartesianGrid vertical={false} stroke="#e3dacb" />
            <XAxis
              dataKey="month"
              tick={{ fill: '#5c564d', fontSize: 12 }}
              axisLine={{ stroke: '#c9bca8' }}
              tickLine={false}
              interval="preserveStartEnd"
              minTickGap={12}
            />
            <YAxis tickFormatter={(v: number) => `${v} L`} tick={{ fill: '#5c564d', fontSize: 11 }} axisLine={false} tickLine={false} width={64} />
            <Tooltip formatter={(v) => `${Number(v).toFixed(1)} L`} cursor={{ fill: '#efe8dc' }} />
            <Legend wrapperStyle={{ fontSize: 12 }} />
            <Bar dataKey="brewed" name="Brewed" fill={colours.brewed} radius={[3, 3, 0, 0]} isAnimationActive={false} />
            <Bar dataKey="held" name="At the co-op at month end" fill={colours.held} radius={[3, 3, 0, 0]} isAnimationActive={false} />
            <Bar dataKey="out" name="Removed or lost" fill={colours.out} radius={[3, 3, 0, 0]} isAnimationActive={false} />
          </BarChart>
        </ResponsiveContainer>
      </div>
    </figure>
  );
};
