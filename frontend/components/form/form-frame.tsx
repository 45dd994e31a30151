import type { FormEventHandler, ReactNode } from 'react';
import type { FormMessage } from '@/components/form/use-api-form';
import { Alert } from '@/components/ui/alert';
import { Button, type ButtonVariant } from '@/components/ui/button';
import { DialogActions } from '@/components/ui/dialog';
import { useReportBusy } from '@/components/ui/form-dialog';
import { cn } from '@/utils/cn';

export interface FormFrameProps {
  onSubmit: FormEventHandler<HTMLFormElement>;
  /** The form's own message (from `useApiForm`), above the fields. */
  message?: FormMessage | null;
  /** Or an error in words, for a form that keeps its own. */
  error?: string | null;
  /** The submit button's label; without one the form has no buttons (a read-only view). */
  submitLabel?: ReactNode;
  /** While the request is pending the submit button spins and Cancel waits. */
  pending?: boolean;
  submitDisabled?: boolean;
  submitClassName?: string;
  submitVariant?: ButtonVariant;
  /** A Cancel button (a dialog's), left of the submit button. */
  onCancel?: () => void;
  cancelLabel?: ReactNode;
  /**
   * Where the buttons stand: at the end (a dialog's footer), at the start under the fields, or inline after
   * the fields of a form laid out as one row (`className` with `flex flex-wrap`; the message then takes a line of its own).
   */
  actions?: 'end' | 'start' | 'inline';
  /** Shown instead of the buttons when there is no `submitLabel`. */
  readOnlyNote?: ReactNode;
  /** The browser's own checks (`required`) only when told; the shared schema checks otherwise. */
  browserValidation?: boolean;
  /** The form's layout classes, in place of a column with a gap of 4 (with `panel`, added to the box's). */
  className?: string;
  /** A form standing on its own on a page: a bordered box, its buttons at the start under the fields. */
  panel?: boolean;
  'aria-label'?: string;
  /** What stands above the form's message: a heading, a line of help. */
  intro?: ReactNode;
  children: ReactNode;
}

/**
 * The form kit's frame: the form, its message above the fields, and the footer with the submit button
 * (and Cancel in a dialog). Inside a `FormDialog` it holds the dialog open while the request is pending.
 */
export const FormFrame = ({
  onSubmit,
  message,
  error,
  submitLabel,
  pending = false,
  submitDisabled,
  submitClassName,
  submitVariant,
  onCancel,
  cancelLabel = 'Cancel',
  panel = false,
  actions = panel ? 'start' : 'end',
  readOnlyNote,
  browserValidation = false,
  className,
  'aria-label': label,
  intro,
  children,
}: FormFrameProps) => {
  useReportBusy(pending);
  const shown = message ?? (error ? { tone: 'error' as const, text: error } : null);
  const submit = submitLabel ? (
    <Button type="submit" variant={submitVariant} pending={pending} disabled={submitDisabled} className={submitClassName}>
      {submitLabel}
    </Button>
  ) : null;
  return (
    <form
      onSubmit={onSubmit}
      noValidate={!browserValidation}
      className={panel ? cn('flex flex-col gap-3 rounded-md border border-line bg-surface p-4', className) : (className ?? 'flex flex-col gap-4')}
      aria-label={label}
    >
      {intro}
      {shown ? (
        <Alert tone={shown.tone} className={actions === 'inline' ? 'w-full' : undefined}>
          {shown.text}
        </Alert>
      ) : null}
      {children}
      {!submit ? (
        (readOnlyNote ?? null)
      ) : actions === 'inline' ? (
        submit
      ) : actions === 'start' ? (
        <div>{submit}</div>
      ) : (
        <DialogActions>
          {onCancel ? (
            <Button variant="secondary" onClick={onCancel} disabled={pending}>
              {cancelLabel}
            </Button>
          ) : null}
          {submit}
        </DialogActions>
      )}
    </form>
  );
};
