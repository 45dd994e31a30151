import { useRef, useState } from 'react';
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
import { Button } from '@/components/ui/button';
import { Field } from '@/components/ui/field';
import { Checkbox, Input, Select } from '@/components/ui/input';
import { PageLoader } from '@/components/ui/spinner';
import { paths } from '@/config/paths';
import { useBatch } from '@/features/batches/api/get-batch';
import { importReadings, type UploadProgress } from '@/features/batches/api/import-readings';
import { ImportProgress } from '@/features/batches/components/import-progress';
import { PreviewStep } from '@/features/batches/components/import-preview';
import { useDocumentTitle } from '@/hooks/use-document-title';
import { useQueryClient } from '@tanstack/react-query';
import { batchKeys } from '@/features/batches/api/keys';
import { isApiProblem, problemMessage } from '@/lib/api-client';
import { cn } from '@/utils/cn';
import { formatCount } from '@/utils/format';

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

export default ImportReadingsRoute;
