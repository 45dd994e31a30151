import { useState } from 'react';
import { Link, useNavigate, useParams } from 'react-router-dom';
import type { ImportMapping, ImportMappingInput, ImportPreview, ImportRowProblem } from '../../../../shared/schemas/batches.ts';
import { ImportFailureAlert, MappingStep, StepList, UploadStep, type ImportFailure, type Step } from '@/app/routes/batches/import-steps';
import { PageHeader, QueryFallback } from '@/components/layouts/page-header';
import { Alert } from '@/components/ui/alert';
import { parentPages, paths } from '@/config/paths';
import { useBatch } from '@/features/batches/api/get-batch';
import { importReadings, type UploadProgress } from '@/features/batches/api/import-readings';
import { ImportProgress } from '@/features/batches/components/import-progress';
import { PreviewStep } from '@/features/batches/components/import-preview';
import { useDocumentTitle } from '@/hooks/use-document-title';
import { useQueryClient } from '@tanstack/react-query';
import { batchKeys } from '@/features/batches/api/keys';
import { isApiProblem, problemMessage } from '@/lib/api-client';

const browserZone = () => {
  try {
    return Intl.DateTimeFormat().resolvedOptions().timeZone || 'UTC';
  } catch {
    return 'UTC';
  }
};

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
  const [error, setError] = useState<ImportFailure | null>(null);

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

  const previewRows = async () => {
    if (!file || !mapping) return;
    const r = await run(true, file, mapping);
    if (r) setStep('preview');
  };
  const setField = (key: keyof ImportMapping, value: unknown) => setMapping((m) => (m ? { ...m, [key]: value === '' ? null : value } : m));

  if (batch.isPending || batch.isError) return <QueryFallback query={batch} what="batch" />;
  const b = batch.data;
  if (!b.can.importReadings) return <Alert tone="error">You may not import readings into this batch.</Alert>;

  return (
    <div className="flex flex-col gap-5">
      <PageHeader
        parent={parentPages.batches}
        crumb={
          <>
            <Link to={`${paths.batches}/${b.id}`}>{b.name}</Link> <span className="text-ink-faint">/</span> Import readings
          </>
        }
        title="Import readings"
        intro="From a CSV or XLSX file (a digital hydrometer’s export, or the template). All rows go in, or none."
        report
      />
      <StepList step={step} />
      {error ? <ImportFailureAlert failure={error} /> : null}
      {progress ? <ImportProgress progress={progress} label={busy === 'import' ? 'Importing' : 'Reading the file'} /> : null}
      {step === 'upload' ? <UploadStep busy={busy !== null} timeZone={timeZone} onTimeZone={setTimeZone} onFile={(chosen) => void onFile(chosen)} /> : null}
      {step === 'mapping' && preview && mapping ? (
        <MappingStep
          file={file}
          preview={preview}
          mapping={mapping}
          busy={busy}
          onChange={setField}
          onPreview={() => void previewRows()}
          onRestart={() => {
            setStep('upload');
            setFile(null);
            setPreview(null);
          }}
        />
      ) : null}
      {step === 'preview' && preview && mapping ? (
        <PreviewStep preview={preview} busy={busy} onBack={() => setStep('mapping')} onImport={() => file && void run(false, file, mapping)} />
      ) : null}
    </div>
  );
};

export default ImportReadingsRoute;
