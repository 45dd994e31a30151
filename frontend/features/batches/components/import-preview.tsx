import { useMemo } from 'react';
import { type ImportPreview } from '../../../../shared/schemas/batches.ts';
import { Badge } from '@/components/ui/badge';
import { Button } from '@/components/ui/button';
import { formatSg } from '@/features/batches/components/gravity-format';
import { cn } from '@/utils/cn';
import { formatCount, formatDateTime } from '@/utils/format';

/** The import's last step: every row as it will be stored, problems marked beside their cells. */
export const PreviewStep = ({
  preview,
  busy,
  onBack,
  onImport,
}: {
  preview: ImportPreview;
  busy: 'preview' | 'import' | null;
  onBack: () => void;
  onImport: () => void;
}) => {
  const columns = useMemo(() => preview.headers, [preview.headers]);
  const problemAt = (row: number, column: string) => preview.errors.filter((e) => e.row === row && e.column === column);
  const ok = preview.errorCount === 0;
  return (
    <section className="flex flex-col gap-4 rounded-md border border-line bg-surface p-4" data-testid="import-preview">
      <div className="flex flex-wrap items-center gap-3 text-sm">
        <Badge tone={ok ? 'ready' : 'danger'}>{ok ? 'No problems' : `${formatCount(preview.errorCount)} problem${preview.errorCount === 1 ? '' : 's'}`}</Badge>
        <span>
          {formatCount(preview.validRows)} of {formatCount(preview.totalRows)} rows ready to import. The first {preview.rows.length} are shown.
        </span>
      </div>
      <div className="max-h-[50dvh] overflow-auto rounded-md border border-line">
        <table className="w-full border-separate border-spacing-0 text-sm">
          <caption className="sr-only">Preview of the first rows</caption>
          <thead>
            <tr>
              {['Row', ...columns, 'Time read as', 'Stored SG', ''].map((h, i) => (
                <th
                  key={`${h}-${i}`}
                  scope="col"
                  className="sticky top-0 border-b border-line-strong bg-ground-deep px-2 py-1.5 text-left text-xs font-semibold text-ink-muted uppercase"
                >
                  {h}
                </th>
              ))}
            </tr>
          </thead>
          <tbody>
            {preview.rows.map((r) => (
              <tr key={r.row} className={cn(r.status === 'error' && 'bg-danger-soft/50')} data-status={r.status}>
                <td className="border-b border-line px-2 py-1 tabular-nums text-ink-muted">{r.row}</td>
                {columns.map((c) => {
                  const problems = problemAt(r.row, c);
                  return (
                    <td
                      key={c}
                      className={cn('border-b border-line px-2 py-1', problems.length && 'outline-2 -outline-offset-2 outline-danger')}
                      title={problems.map((p) => p.message).join('; ') || undefined}
                    >
                      {r.values[c]}
                      {problems.length ? <span className="block text-xs text-danger">{problems.map((p) => p.message).join('; ')}</span> : null}
                    </td>
                  );
                })}
                <td className="border-b border-line px-2 py-1 whitespace-nowrap">{r.takenAt ? formatDateTime(r.takenAt) : '—'}</td>
                <td className="border-b border-line px-2 py-1 tabular-nums">
                  {formatSg(r.gravitySg, 4)}
                  {r.corrected ? <span className="ml-1 text-xs text-ink-muted">corrected</span> : null}
                </td>
                <td className="border-b border-line px-2 py-1 text-xs">
                  {r.status === 'ok' ? (
                    <Badge tone="ready">OK</Badge>
                  ) : r.status === 'blank' ? (
                    <Badge tone="muted">Blank, skipped</Badge>
                  ) : r.status === 'duplicate-skipped' ? (
                    <Badge tone="muted">Duplicate, skipped</Badge>
                  ) : (
                    <Badge tone="danger">Problem</Badge>
                  )}
                  {r.problems
                    .filter((p) => !columns.includes(p.column))
                    .map((p, i) => (
                      <span key={i} className="block text-danger">
                        {p.message}
                      </span>
                    ))}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      {!ok ? (
        <div className="text-sm">
          <p className="font-semibold">
            Every problem, by row and column{preview.errorCount > preview.errors.length ? ` (the first ${preview.errors.length})` : ''}:
          </p>
          <ul className="mt-1 max-h-48 list-disc overflow-auto pl-5" data-testid="import-problems">
            {preview.errors.map((p, i) => (
              <li key={i}>
                Row {p.row}
                {p.column ? `, ${p.column}` : ''}: {p.message}
              </li>
            ))}
          </ul>
          <p className="mt-2 text-ink-muted">Fix the file and upload it again, or change the column mapping. Nothing is imported while a row has a problem.</p>
        </div>
      ) : null}
      <div className="flex flex-wrap gap-2">
        <Button onClick={onImport} disabled={!ok || preview.validRows === 0} pending={busy === 'import'}>
          Import {formatCount(preview.validRows)} reading{preview.validRows === 1 ? '' : 's'}
        </Button>
        <Button variant="secondary" onClick={onBack} disabled={busy !== null}>
          Back to the columns
        </Button>
      </div>
    </section>
  );
};
