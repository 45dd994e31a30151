import type { ComponentProps, ReactNode } from 'react';
import { Link, type LinkProps } from 'react-router-dom';
import { Spinner } from '@/components/ui/spinner';
import { cn } from '@/utils/cn';

export type ButtonVariant = 'primary' | 'secondary' | 'ghost';
export type ButtonSize = 'sm' | 'md';

const base =
  'inline-flex items-center justify-center gap-2 rounded-md font-medium whitespace-nowrap no-underline hover:no-underline ' +
  'transition-colors disabled:cursor-not-allowed disabled:opacity-55 select-none';

const variants: Record<ButtonVariant, string> = {
  primary: 'bg-copper text-white shadow-sm hover:bg-copper-strong active:bg-copper-strong',
  secondary: 'border border-line-strong bg-surface text-ink hover:border-copper hover:bg-copper-soft/50',
  ghost: 'text-ink hover:bg-ground-deep',
};

// 44 px targets on phones and any coarse pointer; compact on desktop with a mouse.
const sizes: Record<ButtonSize, string> = {
  sm: 'min-h-11 px-3 text-sm md:min-h-7 md:px-2.5 md:text-xs pointer-coarse:min-h-11',
  md: 'min-h-11 px-4 text-sm md:min-h-9 pointer-coarse:min-h-11',
};

export function buttonClasses(variant: ButtonVariant = 'primary', size: ButtonSize = 'md', className?: string) {
  return cn(base, variants[variant], sizes[size], className);
}

export interface ButtonProps extends ComponentProps<'button'> {
  variant?: ButtonVariant;
  size?: ButtonSize;
  /** Shows a spinner, disables the button and sets aria-busy. */
  pending?: boolean;
  icon?: ReactNode;
}

export const Button = ({ variant = 'primary', size = 'md', pending = false, icon, className, disabled, children, type = 'button', ...props }: ButtonProps) => (
  <button type={type} className={buttonClasses(variant, size, className)} disabled={disabled || pending} aria-busy={pending || undefined} {...props}>
    {pending ? <Spinner className="size-4" /> : icon}
    {children}
  </button>
);

export interface ButtonLinkProps extends LinkProps {
  variant?: ButtonVariant;
  size?: ButtonSize;
}

export const ButtonLink = ({ variant = 'secondary', size = 'md', className, ...props }: ButtonLinkProps) => (
  <Link className={buttonClasses(variant, size, typeof className === 'string' ? className : undefined)} {...props} />
);
