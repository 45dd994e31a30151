import { Bar, BarChart, CartesianGrid, Cell, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';
import { ageingBucketLabels, ageingBuckets, type AgeingBucket } from '../../../../shared/schemas/billing.ts';
import { money } from '@/features/billing/components/money';

// Older is warmer: from the ground's ink through amber to copper; red stays for safety and errors.
const fills: Record<AgeingBucket, string> = { '0-30': '#8a8277', '31-60': '#c2850f', '61-90': '#b0592a', '90+': '#8f4520' };

export interface AgeingChartProps {
  totals: Record<AgeingBucket, number>;
  currency: string;
}

/** Open amounts by age of invoice, as bars; the same figures are in the table beside it for screen readers. */
export const AgeingChart = ({ totals, currency }: AgeingChartProps) => {
  const data = ageingBuckets.map((b) => ({ bucket: ageingBucketLabels[b], key: b, cents: totals[b], fill: fills[b] }));
  return (
    <div className="h-56 w-full" aria-hidden="true">
      <ResponsiveContainer width="100%" height="100%">
        <BarChart accessibilityLayer={false} data={data} margin={{ top: 8, right: 8, bottom: 0, left: 8 }}>
          <CartesianGrid vertical={false} stroke="#e3dacb" />
          <XAxis dataKey="bucket" tick={{ fill: '#5c564d', fontSize: 12 }} axisLine={{ stroke: '#c9bca8' }} tickLine={false} />
          <YAxis
            tickFormatter={(v: number) => money(v, currency).replace(/\.00$/, '')}
            tick={{ fill: '#5c564d', fontSize: 11 }}
            axisLine={false}
            tickLine={false}
            width={72}
          />
          <Tooltip formatter={(v) => money(Number(v), currency)} cursor={{ fill: '#efe8dc' }} />
          <Bar dataKey="cents" name="Open" radius={[3, 3, 0, 0]} isAnimationActive={false}>
            {data.map((d) => (
              <Cell key={d.key} fill={d.fill} />
            ))}
          </Bar>
        </BarChart>
      </ResponsiveContainer>
    </div>
  );
};
