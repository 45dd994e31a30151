import type { ReactNode } from 'react';
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
import { Checkbox, Input, Options, Select } from '@/components/ui/input';
import { cn } from '@/utils/cn';
import { formatCount } from '@/utils/format';

export type Step = 'upload' | 'mapping' | 'preview';
const steps: { key: Step; label: string }[] = [
  { key: 'upload', label: '1. Upload' },
  { key: 'mapping', label: '2. Columns' },
  { key: 'preview', label: '3. Preview and import' },
];

/** Where the import stands: upload, columns, preview. */
export const StepList = ({ step }: { step: Step }) => (
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
);

export interface ImportFailure {
  message: string;
  problems: ImportRowProblem[];
}

/** Why the file was refused, with the first twenty rows' problems. */
export const ImportFailureAlert = ({ failure }: { failure: ImportFailure }) => (
  <Alert tone="error" title="The file could not be imported">
    <p>{failure.message}</p>
    {failure.problems.length ? (
      <ul className="mt-1 list-disc pl-5">
        {failure.problems.slice(0, 20).map((p, i) => (
          <li key={i}>
            Row {p.row}
            {p.column ? `, ${p.column}` : ''}: {p.message}
          </li>
        ))}
      </ul>
    ) : null}
  </Alert>
);

const StepSection = ({ children }: { children: ReactNode }) => (
  <section className="flex flex-col gap-4 rounded-md border border-line bg-surface p-4">{children}</section>
);

export interface UploadStepProps {
  busy: boolean;
  timeZone: string;
  onTimeZone: (timeZone: string) => void;
  onFile: (file: File | null) => void;
}

export const UploadStep = ({ busy, timeZone, onTimeZone, onFile }: UploadStepProps) => (
  <StepSection>
    <Field label="Readings file" hint="CSV (comma, semicolon or tab), or an XLSX workbook (its first sheet). Up to 16 MB.">
      {(c) => (
        <input
          {...c}
          type="file"
          accept=".csv,.tsv,.txt,.xlsx,text/csv,application/vnd.openxmlformats-officedocument.spreadsheetml.sheet"
          disabled={busy}
          onChange={(e) => onFile(e.target.files?.[0] ?? null)}
          className="block text-sm file:mr-3 file:min-h-9 file:rounded-md file:border file:border-line-strong file:bg-surface file:px-3 file:text-sm file:text-ink hover:file:border-copper"
        />
      )}
    </Field>
    <Field label="Time zone of times without an offset" hint="Most exports write local times.">
      {(c) => <Input {...c} value={timeZone} onChange={(e) => onTimeZone(e.target.value)} className="max-w-64" />}
    </Field>
    <p className="text-sm">
      No file yet? Start from a template: <a href="/api/readings/template.csv">CSV</a> · <a href="/api/readings/template.xlsx">XLSX</a>
    </p>
  </StepSection>
);

const columnLabels: Record<'takenAt' | 'gravity' | 'unit' | 'temperature' | 'note', string> = {
  takenAt: 'Time of the reading',
  gravity: 'Gravity',
  unit: 'Unit (SG, °P, °Bx)',
  temperature: 'Sample temperature',
  note: 'Note',
};
type ColumnKey = keyof typeof columnLabels;
const columnKeys = Object.keys(columnLabels) as ColumnKey[];

/** The settings that are a choice among a few values: label, hint, default, choices. */
const choiceSettings = [
  { name: 'temperatureUnit', label: 'Temperature unit', fallback: 'c', labels: { c: '°C', f: '°F' } },
  {
    name: 'dateOrder',
    label: 'Dates like 03/10/2026 are',
    fallback: 'auto',
    labels: { auto: 'Worked out from the column', dmy: 'Day / month / year', mdy: 'Month / day / year', ymd: 'Year / month / day' },
  },
  {
    name: 'onDuplicate',
    label: 'A row at the time of an existing reading',
    fallback: 'error',
    labels: { error: 'is a problem (nothing is imported)', skip: 'is skipped (re-importing a longer export)' },
  },
] as const satisfies readonly { name: keyof ImportMapping; label: string; fallback: string; labels: Record<string, string> }[];

const sourceLabels = { proposed: 'proposed from the column names', remembered: 'the mapping you used last time', given: 'as you set it' } as const;

export interface MappingStepProps {
  file: File | null;
  preview: ImportPreview;
  mapping: ImportMappingInput;
  busy: 'preview' | 'import' | null;
  onChange: (key: keyof ImportMapping, value: unknown) => void;
  onPreview: () => void;
  onRestart: () => void;
}

/** Which column holds what, and how to read it. */
export const MappingStep = ({ file, preview, mapping, busy, onChange, onPreview, onRestart }: MappingStepProps) => (
  <StepSection>
    <p className="text-sm">
      <strong>{file?.name}</strong>: {preview.fileType.toUpperCase()}
      {preview.delimiter ? `, separated by ${preview.delimiter === '\t' ? 'tabs' : `“${preview.delimiter}”`}` : ''}, {formatCount(preview.totalRows)} rows.
      Columns {sourceLabels[preview.mappingSource]}.
    </p>
    <div className="grid gap-4 md:grid-cols-2">
      {columnKeys.map((key) => (
        <Field key={key} label={columnLabels[key]}>
          {(c) => (
            <Select {...c} value={mapping[key] ?? ''} onChange={(e) => onChange(key, e.target.value)} data-field={key}>
              {key === 'takenAt' || key === 'gravity' ? null : <option value="">Not in the file</option>}
              <Options values={preview.headers} />
            </Select>
          )}
        </Field>
      ))}
      <Field label="Gravity scale" hint={mapping.unit ? 'Used where the unit column is blank.' : 'The scale of the whole gravity column.'}>
        {(c) => (
          <Select {...c} value={mapping.gravityUnit ?? 'sg'} onChange={(e) => onChange('gravityUnit', e.target.value)}>
            <Options values={gravityUnits} labels={gravityUnitLabels} />
          </Select>
        )}
      </Field>
      {choiceSettings.slice(0, 2).map((setting) => (
        <ChoiceSetting key={setting.name} {...setting} mapping={mapping} onChange={onChange} />
      ))}
      <Field label="Time zone">{(c) => <Input {...c} value={mapping.timeZone ?? ''} onChange={(e) => onChange('timeZone', e.target.value)} />}</Field>
      <ChoiceSetting {...choiceSettings[2]} mapping={mapping} onChange={onChange} />
    </div>
    <Checkbox
      label="Correct hydrometer readings (SG, °P) to the calibration temperature"
      description="Leave off for a digital hydrometer that compensates by itself."
      checked={mapping.correctTemperature ?? true}
      onChange={(e) => onChange('correctTemperature', e.target.checked)}
    />
    <div className="flex flex-wrap gap-2">
      <Button onClick={onPreview} pending={busy === 'preview'}>
        Preview the rows
      </Button>
      <Button variant="secondary" onClick={onRestart} disabled={busy !== null}>
        Choose another file
      </Button>
    </div>
  </StepSection>
);

type ChoiceSettingProps = (typeof choiceSettings)[number] & Pick<MappingStepProps, 'mapping' | 'onChange'>;

const ChoiceSetting = ({ name, label, fallback, labels, mapping, onChange }: ChoiceSettingProps) => (
  <Field label={label}>
    {(c) => (
      <Select {...c} value={mapping[name] ?? fallback} onChange={(e) => onChange(name, e.target.value)}>
        <Options values={Object.keys(labels)} labels={labels as Record<string, string>} />
      </Select>
    )}
  </Field>
);
