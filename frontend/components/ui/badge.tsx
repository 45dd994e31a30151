import type { ReactNode } from 'react';
import { cn } from '@/utils/cn';

/** ready = hop green, due = amber, danger = red (safety and errors only), copper = yours to act on. */
export type BadgeTone = 'neutral' | 'muted' | 'copper' | 'ready' | 'due' | 'danger';

const tones: Record<BadgeTone, string> = {
  neutral: 'bg-ground-deep text-ink border-line-strong',
  muted: 'bg-transparent text-ink-muted border-line-strong border-dashed',
  copper: 'bg-copper-soft text-copper-strong border-copper/30',
  ready: 'bg-hop-soft text-hop-strong border-hop/30',
  due: 'bg-due-soft text-due-strong border-due/40',
  danger: 'bg-danger-soft text-danger-strong border-danger/30',
};

export interface BadgeProps {
  tone?: BadgeTone;
  className?: string;
  children: ReactNode;
}

export const Badge = ({ tone = 'neutral', className, children }: BadgeProps) => (
  <span className={cn('inline-flex items-center rounded-sm border px-1.5 py-px text-xs leading-5 font-medium whitespace-nowrap', tones[tone], className)}>
    {children}
  </span>
);
