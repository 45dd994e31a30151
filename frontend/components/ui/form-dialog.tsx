import { createContext, useContext, useEffect, useState } from 'react';
import { Dialog, type DialogProps } from '@/components/ui/dialog';

const ReportBusy = createContext<((busy: boolean) => void) | null>(null);

/**
 * A {@link Dialog} around one form: while the form inside says its request is pending (the form kit's
 * `FormFrame` does), Esc and the close button do nothing. The form mounts only while the dialog is open.
 */
export const FormDialog = ({ busy = false, ...dialog }: DialogProps) => {
  const [pending, setPending] = useState(false);
  return (
    <ReportBusy.Provider value={setPending}>
      <Dialog {...dialog} busy={busy || pending} />
    </ReportBusy.Provider>
  );
};

/** Tells the enclosing {@link FormDialog}, if any, whether a request is pending; nothing outside one. */
export function useReportBusy(busy: boolean) {
  const report = useContext(ReportBusy);
  useEffect(() => {
    if (!report) return;
    report(busy);
    return () => report(false);
  }, [report, busy]);
}
