import { useState } from 'react';
import { Navigate } from 'react-router-dom';
import { nextPeriod, periodLabel, todayIn } from '../../../../shared/billing/dates.ts';
import { buttonClasses } from '@/components/ui/button';
import { Input } from '@/components/ui/input';
import { paths } from '@/config/paths';
import { useDocumentTitle } from '@/hooks/use-document-title';
import { useAppAbility } from '@/lib/ability';
import { coopTimeZone } from '@/utils/format';

const exportUrl = (period: string, format: 'csv' | 'xlsx') => `/api/invoices/export?${new URLSearchParams({ period, format })}`;

/** The ledger for the accountant: a period's invoice lines, credit notes and payments. */
const ExportsRoute = () => {
  useDocumentTitle('Exports');
  const ability = useAppAbility();
  const [period, setPeriod] = useState(() => nextPeriod(todayIn(coopTimeZone(), new Date()).slice(0, 7), -1));
  if (!ability.can('export', 'Invoice')) return <Navigate to={paths.myInvoices} replace />;
  return (
    <div className="flex max-w-2xl flex-col gap-4">
      <p className="text-ink-muted">
        The lines of every issued invoice of the month (void ones included, with the credit notes that replace them), and every payment and refund on those
        invoices. Amounts are numbers in the currency; text a spreadsheet could mistake for a formula is prefixed with an apostrophe.
      </p>
      <label className="flex flex-col gap-1 text-sm font-medium">
        Period
        <Input type="month" value={period} onChange={(e) => e.target.value && setPeriod(e.target.value)} className="w-48" />
      </label>
      <div className="flex flex-wrap gap-2">
        <a className={buttonClasses('primary')} href={exportUrl(period, 'xlsx')} download>
          {periodLabel(period)} as XLSX
        </a>
        <a className={buttonClasses('secondary')} href={exportUrl(period, 'csv')} download>
          {periodLabel(period)} as CSV
        </a>
      </div>
      <p className="text-sm text-ink-muted">
        The XLSX has three sheets (invoice lines, credit notes, payments); the CSV has the same rows in one table, with a Record column saying which.
      </p>
    </div>
  );
};

export default ExportsRoute;
