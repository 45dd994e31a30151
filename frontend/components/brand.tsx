import { coopName, productName } from '@/config/app';
import { cn } from '@/utils/cn';

/** Our mark: a keg in outline, copper on the ground. */
export const BrandMark = ({ className }: { className?: string }) => (
  <svg viewBox="0 0 32 32" className={cn('size-7 shrink-0', className)} aria-hidden="true">
    <rect width="32" height="32" rx="7" className="fill-copper" />
    <path d="M10 8h12v16a2 2 0 0 1-2 2h-8a2 2 0 0 1-2-2z" fill="none" className="stroke-ground" strokeWidth="2.4" />
    <path d="M10 14h12M10 20h12" className="stroke-ground" strokeWidth="2" />
  </svg>
);

export const Brand = ({ className }: { className?: string }) => (
  <span className={cn('flex min-w-0 items-center gap-2.5', className)}>
    <BrandMark />
    <span className="flex min-w-0 flex-col leading-tight sm:flex-row sm:items-baseline sm:gap-2">
      <span className="text-base font-semibold tracking-tight text-ink">{productName}</span>
      <span className="truncate text-xs text-ink-muted">{coopName}</span>
    </span>
  </span>
);
