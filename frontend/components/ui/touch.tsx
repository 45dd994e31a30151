import type { ComponentProps, ReactNode } from 'react';
import { cn } from '@/utils/cn';

/**
 * Controls for the wet cellar: at least 48 px tall on every screen size, so a gloved thumb
 * on a phone hits them.
 */
export const BigCheck = ({
  label,
  description,
  className,
  ...props
}: Omit<ComponentProps<'input'>, 'type'> & { label: ReactNode; description?: ReactNode }) => (
  <label
    className={cn(
      'flex min-h-12 md:min-h-12 pointer-coarse:min-h-12 cursor-pointer items-start gap-3 rounded-md border border-line-strong bg-surface px-3 py-3 has-[:checked]:border-hop has-[:checked]:bg-hop-soft/60',
      className,
    )}
  >
    <input type="checkbox" className="mt-0.5 size-6 shrink-0 accent-copper" {...props} />
    <span className="flex flex-col">
      <span className="font-medium text-ink">{label}</span>
      {description ? <span className="text-xs text-ink-muted">{description}</span> : null}
    </span>
  </label>
);

export const BigChoice = ({
  label,
  description,
  className,
  ...props
}: Omit<ComponentProps<'input'>, 'type'> & { label: ReactNode; description?: ReactNode }) => (
  <label
    className={cn(
      'flex min-h-12 md:min-h-12 pointer-coarse:min-h-12 flex-1 cursor-pointer items-start gap-3 rounded-md border border-line-strong bg-surface px-3 py-3 has-[:checked]:border-copper has-[:checked]:bg-copper-soft/60',
      className,
    )}
  >
    <input type="radio" className="mt-0.5 size-5 shrink-0 accent-copper" {...props} />
    <span className="flex flex-col">
      <span className="font-medium text-ink">{label}</span>
      {description ? <span className="text-xs text-ink-muted">{description}</span> : null}
    </span>
  </label>
);

/** A text or number box at touch size. */
export const BigInput = ({ className, ...props }: ComponentProps<'input'>) => (
  <input
    className={cn(
      'block min-h-12 md:min-h-12 pointer-coarse:min-h-12 w-full rounded-md border border-line-strong bg-surface px-3 text-base text-ink focus-visible:outline-2 focus-visible:outline-offset-1 focus-visible:outline-copper-strong aria-[invalid=true]:border-danger',
      className,
    )}
    {...props}
  />
);

export const BigSelect = ({ className, children, ...props }: ComponentProps<'select'>) => (
  <select
    className={cn(
      'block min-h-12 md:min-h-12 pointer-coarse:min-h-12 w-full rounded-md border border-line-strong bg-surface px-3 text-base text-ink focus-visible:outline-2 focus-visible:outline-offset-1 focus-visible:outline-copper-strong',
      className,
    )}
    {...props}
  >
    {children}
  </select>
);

export const bigButton = 'min-h-12 md:min-h-12 pointer-coarse:min-h-12 px-5 text-base';
