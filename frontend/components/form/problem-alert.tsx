import type { ReactNode } from 'react';
import { Alert } from '@/components/ui/alert';
import { problemMessage } from '@/lib/api-client';

export interface ProblemAlertProps {
  /** A failed request's error (a mutation's `error`); nothing is shown while it is null. */
  error: unknown;
  title?: ReactNode;
  className?: string;
}

/** What went wrong with an action outside a form (a Withdraw, an Unlock), in words. */
export const ProblemAlert = ({ error, title, className }: ProblemAlertProps) =>
  error ? (
    <Alert tone="error" title={title} className={className}>
      {problemMessage(error)}
    </Alert>
  ) : null;
