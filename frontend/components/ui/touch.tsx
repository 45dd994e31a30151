import type { ComponentProps, ReactNode } from 'react';
import { cn } from '@/utils/cn';

/**
 * Controls for the wet cellar: at least 48 px tall on every screen size, so a gloved thumb
 * on a phone hits them.
 */
type BigToggleProps = Omit<ComponentProps<'input'>, 'type'> & { label: ReactNode; description?: ReactNode };

/** A checkbox or radio with its label and an optional line under it, the whole card the target. */
const BigToggle = ({ type, label, description, className, box, ...props }: BigToggleProps & { type: 'checkbox' | 'radio'; box: string }) => (
  <label
    className={cn(
      'flex min-h-12 md:min-h-12 pointer-coarse:min-h-12 cursor-pointer items-start gap-3 rounded-md border border-line-strong bg-surface px-3 py-3',
      box,
      className,
    )}
  >
    <input type={type} className={cn('mt-0.5 shrink-0 accent-copper', type === 'checkbox' ? 'size-6' : 'size-5')} {...props} />
    <span className="flex flex-col">
      <span className="font-medium text-ink">{label}</span>
      {description ? <span className="text-xs text-ink-muted">{description}</span> : null}
    </span>
  </label>
);

export const BigCheck = (props: BigToggleProps) => <BigToggle type="checkbox" box="has-[:checked]:border-hop has-[:checked]:bg-hop-soft/60" {...props} />;

export const BigChoice = (props: BigToggleProps) => (
  <BigToggle type="radio" box="flex-1 has-[:checked]:border-copper has-[:checked]:bg-copper-soft/60" {...props} />
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

/** A big box for an amount: a decimal number, never negative (strength, minutes, resistance). */
export const BigAmount = (props: Omit<ComponentProps<'input'>, 'type'>) => <BigInput type="number" inputMode="decimal" step="any" min={0} {...props} />;

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
