import { useMemo, useRef, useState } from 'react';
import { Link, useNavigate, useParams } from 'react-router-dom';
import {
  gravityUnits,
  gravityUnitLabels,
  type ImportMapping,
  type ImportMappingInput,
  type ImportPreview,
  type ImportRowProblem,
} from '../../../../shared/schemas/batches.ts';
import { Alert } from '@/components/ui/alert';
import { Badge } from '@/components/ui/badge';
import { Button } from '@/components/ui/button';
import { Field } from '@/components/ui/field';
import { Checkbox, Input, Select } from '@/components/ui/input';
import { PageLoader } from '@/components/ui/spinner';
import { paths } from '@/config/paths';
import { useBatch } from '@/features/batches/api/get-batch';
import { importReadings, type UploadProgress } from '@/features/batches/api/import-readings';
import { ImportProgress } from '@/features/batches/components/import-progress';
import { formatSg } from '@/features/batches/components/gravity-format';
import { useDocumentTitle } from '@/hooks/use-document-title';
import { useQueryClient } from '@tanstack/react-query';
import { batchKeys } from '@/features/batches/api/keys';
import { isApiProblem, problemMessage } from '@/lib/api-client';
import { cn } from '@/utils/cn';
import { formatCount, formatDateTime } from '@/utils/format';

type Step = 'upload' | 'mapping' | 'preview';
const steps: { key: Step; label: string }[] = [
  { key: 'upload', label: '1. Upload' },
  { key: 'mapping', label: '2. Columns' },
  { key: 'preview', label: '3. Preview and import' },
];

const browserZone = () => {
  try {
    return Intl.DateTimeFormat().resolvedOptions().timeZone || 'UTC';
  } catch {
    return 'UTC';
  }
};

const fieldLabels: Record<'takenAt' | 'gravity' | 'unit' | 'temperature' | 'note', string> = {
  takenAt: 'Time of the reading',
  gravity: 'Gravity',
  unit: 'Unit (SG, °P, °Bx)',
  temperature: 'Sample temperature',
  note: 'Note',
};

const sourceLabels = { proposed: 'proposed from the column names', remembered: 'the mapping you used last time', given: 'as you set it' } as const;

/** Import readings from a CSV or XLSX file: upload (with progress) → column mapping → preview with problems marked → import. */
const ImportReadingsRoute = () => {
  const { batchId = '' } = useParams();
  const batch = useBatch(batchId);
  const navigate = useNavigate();
  const queryClient = useQueryClient();
  useDocumentTitle('Import readings');
  const [step, setStep] = useState<Step>('upload');
  const [file, setFile] = useState<File | null>(null);
  const [timeZone, setTimeZone] = useState(browserZone);
  const [preview, setPreview] = useState<ImportPreview | null>(null);
  const [mapping, setMapping] = useState<ImportMappingInput | null>(null);
  const [progress, setProgress] = useState<UploadProgress | null>(null);
  const [busy, setBusy] = useState<'preview' | 'import' | null>(null);
  const [error, setError] = useState<{ message: string; problems: ImportRowProblem[] } | null>(null);
  const inputRef = useRef<HTMLInputElement>(null);

  const run = async (dryRun: boolean, chosen: File, withMapping: ImportMappingInput | undefined) => {
    setError(null);
    setBusy(dryRun ? 'preview' : 'import');
    setProgress({ upload: 0, server: null });
    try {
      const result = await importReadings({ batchId, file: chosen, mapping: withMapping, dryRun, onProgress: setProgress });
      if (dryRun && result.preview) {
        setPreview(result.preview);
        setMapping(result.preview.mapping);
        return result;
      }
      void queryClient.invalidateQueries({ queryKey: batchKeys.detail(batchId) });
      void queryClient.invalidateQueries({ queryKey: batchKeys.lists() });
      void navigate(`${paths.batches}/${batchId}`, { state: { imported: result.imported, skipped: result.skipped } });
      return result;
    } catch (e) {
      setError({
        message: problemMessage(e),
        problems: isApiProblem(e)
          ? e.errors.filter((x): x is ImportRowProblem => typeof x.row === 'number').map((x) => ({ ...x, column: String(x.column ?? '') }))
          : [],
      });
      return null;
    } finally {
      setBusy(null);
      setProgress(null);
    }
  };

  const onFile = async (chosen: File | null) => {
    setFile(chosen);
    setPreview(null);
    setMapping(null);
    if (!chosen) return;
    // First look: the server proposes (or remembers) a mapping; the co-op member's time zone applies to times without an offset.
    const first = await run(true, chosen, undefined);
    if (first?.preview) {
      const m = first.preview.mappingSource === 'proposed' ? { ...first.preview.mapping, timeZone } : first.preview.mapping;
      setMapping(m);
      setStep('mapping');
    }
  };

  const headers = preview?.headers ?? [];
  const setField = (key: keyof ImportMapping, value: unknown) => setMapping((m) => (m ? { ...m, [key]: value === '' ? null : value } : m));

  if (batch.isPending) return <PageLoader />;
  if (batch.isError)
    return (
      <Alert tone="error" title="This batch could not be shown">
        {problemMessage(batch.error)}
      </Alert>
    );
  const b = batch.data;
  if (!b.can.importReadings) return <Alert tone="error">You may not import readings into this batch.</Alert>;

  return (
    <div className="flex flex-col gap-5">
      <nav className="text-sm">
        <Link to={paths.batches}>Batches</Link> <span className="text-ink-faint">/</span> <Link to={`${paths.batches}/${b.id}`}>{b.name}</Link>{' '}
        <span className="text-ink-faint">/</span> Import readings
      </nav>
      <header>
        <h1 className="text-2xl">Import readings</h1>
        <p className="text-sm text-ink-muted">From a CSV or XLSX file (a digital hydrometer’s export, or the template). All rows go in, or none.</p>
      </header>
      <ol className="flex flex-wrap gap-2 text-sm" aria-label="Steps">
        {steps.map((s) => (
          <li
            key={s.key}
            aria-current={s.key === step ? 'step' : undefined}
            className={cn(
              'rounded-full border px-3 py-1',
              s.key === step ? 'border-copper bg-copper-soft font-semibold text-copper-strong' : 'border-line text-ink-muted',
            )}
          >
            {s.label}
          </li>
        ))}
      </ol>

      {error ? (
        <Alert tone="error" title="The file could not be imported">
          <p>{error.message}</p>
          {error.problems.length ? (
            <ul className="mt-1 list-disc pl-5">
              {error.problems.slice(0, 20).map((p, i) => (
                <li key={i}>
                  Row {p.row}
                  {p.column ? `, ${p.column}` : ''}: {p.message}
                </li>
              ))}
            </ul>
          ) : null}
        </Alert>
      ) : null}
      {progress ? <ImportProgress progress={progress} label={busy === 'import' ? 'Importing' : 'Reading the file'} /> : null}

      {step === 'upload' ? (
        <section className="flex flex-col gap-4 rounded-md border border-line bg-surface p-4">
          <Field label="Readings file" hint="CSV (comma, semicolon or tab), or an XLSX workbook (its first sheet). Up to 16 MB.">
            {(c) => (
              <input
                {...c}
                ref={inputRef}
                type="file"
                accept=".csv,.tsv,.txt,.xlsx,text/csv,application/vnd.openxmlformats-officedocument.spreadsheetml.sheet"
                disabled={busy !== null}
                onChange={(e) => void onFile(e.target.files?.[0] ?? null)}
                className="block text-sm file:mr-3 file:min-h-9 file:rounded-md file:border file:border-line-strong file:bg-surface file:px-3 file:text-sm file:text-ink hover:file:border-copper"
              />
            )}
          </Field>
          <Field label="Time zone of times without an offset" hint="Most exports write local times.">
            {(c) => <Input {...c} value={timeZone} onChange={(e) => setTimeZone(e.target.value)} className="max-w-64" />}
          </Field>
          <p className="text-sm">
            No file yet? Start from a template: <a href="/api/readings/template.csv">CSV</a> · <a href="/api/readings/template.xlsx">XLSX</a>
          </p>
        </section>
      ) : null}

      {step === 'mapping' && preview && mapping ? (
        <section className="flex flex-col gap-4 rounded-md border border-line bg-surface p-4">
          <p className="text-sm">
            <strong>{file?.name}</strong>: {preview.fileType.toUpperCase()}
            {preview.delimiter ? `, separated by ${preview.delimiter === '\t' ? 'tabs' : `“${preview.delimiter}”`}` : ''}, {formatCount(preview.totalRows)}{' '}
            rows. Columns {sourceLabels[preview.mappingSource]}.
          </p>
          <div className="grid gap-4 md:grid-cols-2">
            {(Object.keys(fieldLabels) as (keyof typeof fieldLabels)[]).map((key) => (
              <Field key={key} label={fieldLabels[key]}>
                {(c) => (
                  <Select {...c} value={mapping[key] ?? ''} onChange={(e) => setField(key, e.target.value)} data-field={key}>
                    {key === 'takenAt' || key === 'gravity' ? null : <option value="">Not in the file</option>}
                    {headers.map((h) => (
                      <option key={h} value={h}>
                        {h}
                      </option>
                    ))}
                  </Select>
                )}
              </Field>
            ))}
            <Field label="Gravity scale" hint={mapping.unit ? 'Used where the unit column is blank.' : 'The scale of the whole gravity column.'}>
              {(c) => (
                <Select {...c} value={mapping.gravityUnit ?? 'sg'} onChange={(e) => setField('gravityUnit', e.target.value)}>
                  {gravityUnits.map((u) => (
                    <option key={u} value={u}>
                      {gravityUnitLabels[u]}
                    </option>
                  ))}
                </Select>
              )}
            </Field>
            <Field label="Temperature unit">
              {(c) => (
                <Select {...c} value={mapping.temperatureUnit ?? 'c'} onChange={(e) => setField('temperatureUnit', e.target.value)}>
                  <option value="c">°C</option>
                  <option value="f">°F</option>
                </Select>
              )}
            </Field>
            <Field label="Dates like 03/10/2026 are">
              {(c) => (
                <Select {...c} value={mapping.dateOrder ?? 'auto'} onChange={(e) => setField('dateOrder', e.target.value)}>
                  <option value="auto">Worked out from the column</option>
                  <option value="dmy">Day / month / year</option>
                  <option value="mdy">Month / day / year</option>
                  <option value="ymd">Year / month / day</option>
                </Select>
              )}
            </Field>
            <Field label="Time zone">{(c) => <Input {...c} value={mapping.timeZone ?? ''} onChange={(e) => setField('timeZone', e.target.value)} />}</Field>
            <Field label="A row at the time of an existing reading">
              {(c) => (
                <Select {...c} value={mapping.onDuplicate ?? 'error'} onChange={(e) => setField('onDuplicate', e.target.value)}>
                  <option value="error">is a problem (nothing is imported)</option>
                  <option value="skip">is skipped (re-importing a longer export)</option>
                </Select>
              )}
            </Field>
          </div>
          <Checkbox
            label="Correct hydrometer readings (SG, °P) to the calibration temperature"
            description="Leave off for a digital hydrometer that compensates by itself."
            checked={mapping.correctTemperature ?? true}
            onChange={(e) => setField('correctTemperature', e.target.checked)}
          />
          <div className="flex flex-wrap gap-2">
            <Button
              onClick={async () => {
                if (!file) return;
                const r = await run(true, file, mapping);
                if (r) setStep('preview');
              }}
              pending={busy === 'preview'}
            >
              Preview the rows
            </Button>
            <Button
              variant="secondary"
              onClick={() => {
                setStep('upload');
                setFile(null);
                setPreview(null);
              }}
              disabled={busy !== null}
            >
              Choose another file
            </Button>
          </div>
        </section>
      ) : null}

      {step === 'preview' && preview && mapping ? (
        <PreviewStep preview={preview} busy={busy} onBack={() => setStep('mapping')} onImport={() => file && void run(false, file, mapping)} />
      ) : null}
    </div>
  );
};

const PreviewStep = ({
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

export default ImportReadingsRoute;
