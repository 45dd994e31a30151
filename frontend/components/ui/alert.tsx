import type { ReactNode } from 'react';
import { cn } from '@/utils/cn';

export type AlertTone = 'error' | 'info' | 'success';

const tones: Record<AlertTone, string> = {
  error: 'border-danger/40 bg-danger-soft text-danger-strong',
  info: 'border-line-strong bg-surface text-ink',
  success: 'border-hop/40 bg-hop-soft text-hop-strong',
};

export interface AlertProps {
  tone?: AlertTone;
  title?: ReactNode;
  className?: string;
  children?: ReactNode;
}

/** Errors are announced at once (role=alert); other notes politely (role=status). */
export const Alert = ({ tone = 'info', title, className, children }: AlertProps) => (
  <div role={tone === 'error' ? 'alert' : 'status'} className={cn('rounded-md border px-3 py-2 text-sm', tones[tone], className)}>
    {title ? <p className="font-semibold">{title}</p> : null}
    {children ? <div className={cn(title ? 'mt-0.5' : undefined)}>{children}</div> : null}
  </div>
);
