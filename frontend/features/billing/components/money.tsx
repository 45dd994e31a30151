import { cn } from '@/utils/cn';
import { formatMoney } from '@/utils/format';

export interface MoneyProps {
  cents: number;
  currency: string;
  className?: string;
  /** Show credits (negative amounts) muted. */
  muteNegative?: boolean;
}

/** An amount from integer cents, in tabular figures so columns line up. */
export const Money = ({ cents, currency, className, muteNegative = false }: MoneyProps) => (
  <span className={cn('whitespace-nowrap tabular-nums', muteNegative && cents < 0 && 'text-ink-muted', className)}>{formatMoney(cents, currency)}</span>
);

export const money = (cents: number, currency: string) => formatMoney(cents, currency);
