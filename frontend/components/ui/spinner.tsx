import { cn } from '@/utils/cn';

export interface SpinnerProps {
  className?: string;
  label?: string;
}

/** A small turning ring. Decorative unless given a label. */
export const Spinner = ({ className, label }: SpinnerProps) => (
  <svg
    viewBox="0 0 24 24"
    fill="none"
    className={cn('size-5 animate-spin', className)}
    role={label ? 'img' : undefined}
    aria-label={label}
    aria-hidden={label ? undefined : true}
  >
    <circle cx="12" cy="12" r="9" stroke="currentColor" strokeOpacity="0.25" strokeWidth="3" />
    <path d="M21 12a9 9 0 0 0-9-9" stroke="currentColor" strokeWidth="3" strokeLinecap="round" />
  </svg>
);

export const PageLoader = ({ label = 'Loading…' }: { label?: string }) => (
  <div className="flex min-h-40 items-center justify-center gap-3 text-ink-muted" role="status">
    <Spinner className="text-copper" />
    <span>{label}</span>
  </div>
);
