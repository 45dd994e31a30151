import { useEffect, useId, useRef, type ReactNode } from 'react';
import { Alert } from '@/components/ui/alert';
import { Button } from '@/components/ui/button';
import { problemMessage } from '@/lib/api-client';
import { cn } from '@/utils/cn';

export interface DialogProps {
  open: boolean;
  onClose: () => void;
  title: ReactNode;
  description?: ReactNode;
  /** While something is being saved, Esc and the close button do nothing. */
  busy?: boolean;
  className?: string;
  children: ReactNode;
}

/**
 * A modal on the native <dialog>: the browser traps focus, makes the page inert, closes on Esc and
 * returns focus to what opened it. Children mount only while open, so forms start fresh each time.
 */
export const Dialog = ({ open, onClose, title, description, busy = false, className, children }: DialogProps) => {
  const ref = useRef<HTMLDialogElement>(null);
  const titleId = useId();
  const descriptionId = useId();

  useEffect(() => {
    const dialog = ref.current;
    if (!dialog) return;
    if (open && !dialog.open) dialog.showModal();
    if (!open && dialog.open) dialog.close();
  }, [open]);

  return (
    <dialog
      ref={ref}
      aria-labelledby={titleId}
      aria-describedby={description ? descriptionId : undefined}
      onCancel={(event) => {
        event.preventDefault();
        if (!busy) onClose();
      }}
      className={cn(
        'm-auto w-[min(100vw-1.5rem,32rem)] max-h-[calc(100dvh-1.5rem)] overflow-auto rounded-lg border border-line bg-surface p-0 text-ink shadow-xl',
        className,
      )}
    >
      {open ? (
        <div className="flex flex-col gap-4 p-5">
          <div className="flex items-start justify-between gap-3">
            <div>
              <h2 id={titleId} className="text-base">
                {title}
              </h2>
              {description ? (
                <p id={descriptionId} className="mt-1 text-sm text-ink-muted">
                  {description}
                </p>
              ) : null}
            </div>
            <button
              type="button"
              onClick={() => !busy && onClose()}
              className="-mt-1 -mr-2 inline-flex size-11 shrink-0 items-center justify-center rounded-md text-ink-muted hover:bg-ground-deep hover:text-ink md:size-8 pointer-coarse:size-11"
              aria-label="Close"
            >
              <svg viewBox="0 0 16 16" className="size-4" aria-hidden="true">
                <path d="M4 4l8 8M12 4l-8 8" stroke="currentColor" strokeWidth="1.6" strokeLinecap="round" />
              </svg>
            </button>
          </div>
          {children}
        </div>
      ) : null}
    </dialog>
  );
};

/** The buttons row at the foot of a dialog. */
export const DialogActions = ({ children }: { children: ReactNode }) => (
  <div className="flex flex-col-reverse gap-2 pt-1 sm:flex-row sm:justify-end">{children}</div>
);

export interface ConfirmDialogProps {
  open: boolean;
  title: ReactNode;
  children: ReactNode;
  confirmLabel: string;
  cancelLabel?: string;
  pending?: boolean;
  error?: string | null;
  onConfirm: () => void;
  onClose: () => void;
}

export const ConfirmDialog = ({
  open,
  title,
  children,
  confirmLabel,
  cancelLabel = 'Cancel',
  pending = false,
  error,
  onConfirm,
  onClose,
}: ConfirmDialogProps) => (
  <Dialog open={open} onClose={onClose} title={title} busy={pending}>
    <div className="text-sm text-ink">{children}</div>
    {error ? <Alert tone="error">{error}</Alert> : null}
    <DialogActions>
      <Button variant="secondary" onClick={onClose} disabled={pending}>
        {cancelLabel}
      </Button>
      <Button onClick={onConfirm} pending={pending} autoFocus>
        {confirmLabel}
      </Button>
    </DialogActions>
  </Dialog>
);

/** What a confirmed action needs of its mutation (one that takes no input). */
export interface ConfirmedMutation<TData> {
  isPending: boolean;
  error: unknown;
  mutate: (variables: undefined, options: { onSuccess: (data: TData) => void }) => void;
}

export interface MutationConfirmDialogProps<TData> extends Omit<ConfirmDialogProps, 'pending' | 'error' | 'onConfirm'> {
  mutation: ConfirmedMutation<TData>;
  /** After the change went through; the dialog closes first. */
  onDone: (data: TData) => void;
}

/** A confirmation that runs one change: busy while it runs, its error inside, closed once it went through. */
export const MutationConfirmDialog = <TData,>({ mutation, onDone, onClose, ...props }: MutationConfirmDialogProps<TData>) => (
  <ConfirmDialog
    {...props}
    onClose={onClose}
    pending={mutation.isPending}
    error={mutation.error ? problemMessage(mutation.error) : null}
    onConfirm={() =>
      mutation.mutate(undefined, {
        onSuccess: (data) => {
          onClose();
          onDone(data);
        },
      })
    }
  />
);
