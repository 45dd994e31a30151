import { useState, type FormEvent } from 'react';
import type { Equipment } from '../../../../shared/schemas/equipment.ts';
import {
  inspectionKindLabels,
  inspectionKindsByEquipment,
  KPA_PER_PSI,
  type CylinderView,
  type InspectionDue,
  type InspectionKind,
  type InspectionView,
} from '../../../../shared/schemas/inspections.ts';
import { Alert } from '@/components/ui/alert';
import { Badge } from '@/components/ui/badge';
import { Button } from '@/components/ui/button';
import { Field } from '@/components/ui/field';
import { Input, Options, Radio, Select } from '@/components/ui/input';
import { useConnectCylinder, useRecordInspection, useRefillCylinder } from '@/features/equipment/api/inspections';
import { useAppAbility } from '@/lib/ability';
import { problemMessage } from '@/lib/api-client';
import { formatDate, formatDateTime } from '@/utils/format';

/** The value a datetime-local input wants for an instant, in the browser's time zone. */
const localInput = (d: Date) => {
  const p = (n: number) => String(n).padStart(2, '0');
  return `${d.getFullYear()}-${p(d.getMonth() + 1)}-${p(d.getDate())}T${p(d.getHours())}:${p(d.getMinutes())}`;
};

export const DueBadge = ({ due }: { due: Pick<InspectionDue, 'failed' | 'overdue'> & { status?: string } }) =>
  due.failed || due.status === 'failed' ? (
    <Badge tone="danger">Failed</Badge>
  ) : due.overdue || due.status === 'overdue' ? (
    <Badge tone="danger">Past due</Badge>
  ) : due.status === 'due_soon' ? (
    <Badge tone="due">Due soon</Badge>
  ) : (
    <Badge tone="ready">In date</Badge>
  );

/** Rated working pressure in kPa and psi (the registry keeps kPa gauge). */
export const ratingText = (kpa: number) => `${Math.round(kpa)} kPa (${Math.round(kpa / KPA_PER_PSI)} psi)`;

export interface InspectionsPanelProps {
  item: Equipment;
  inspections: InspectionView[];
  inspectionsDue: InspectionDue[];
  cylinder?: CylinderView | undefined;
}

/**
 * An item's pressure-vessel record: what is due, the inspections on record and a form to record one;
 * for a cylinder its contents, whether it is on the gas line, and its log.
 */
export const InspectionsPanel = ({ item, inspections, inspectionsDue, cylinder }: InspectionsPanelProps) => {
  const ability = useAppAbility();
  const kinds = inspectionKindsByEquipment[item.kind];
  if (!kinds.length) return null;
  const blocked = inspectionsDue.filter((d) => d.failed || d.overdue);
  const rated = typeof item.attributes.ratedPressureKpa === 'number' ? item.attributes.ratedPressureKpa : null;
  return (
    <section aria-labelledby="inspections-title" className="rounded-lg border border-line bg-surface p-4">
      <h2 id="inspections-title" className="text-base">
        Inspections
      </h2>
      {item.kind === 'keg' ? (
        <p className="mt-1 text-sm">
          Rated working pressure: <strong>{rated !== null ? ratingText(rated) : 'not recorded'}</strong>
        </p>
      ) : null}
      {blocked.length ? (
        <Alert tone="error" title={`${item.code} may not be ${item.kind === 'co2_cylinder' ? 'used or connected' : 'filled or carbonated'}`} className="mt-2">
          {blocked.map((d) => `${inspectionKindLabels[d.kind]} ${d.failed ? 'failed' : `was due ${formatDate(d.dueAt)}`}`).join('; ')}. Record a passing
          inspection to put it back in use.
        </Alert>
      ) : null}
      <ul className="mt-3 flex flex-col gap-1.5 text-sm" aria-label="Due">
        {kinds.map((kind) => {
          const due = inspectionsDue.find((d) => d.kind === kind);
          return (
            <li key={kind} className="flex flex-wrap items-center justify-between gap-2">
              <span>{inspectionKindLabels[kind]}</span>
              <span className="flex items-center gap-2">
                <span className="text-ink-muted">{due?.dueAt ? `due ${formatDate(due.dueAt)}` : 'none on record'}</span>
                {due ? <DueBadge due={due} /> : null}
              </span>
            </li>
          );
        })}
      </ul>
      {cylinder ? <CylinderBlock item={item} cylinder={cylinder} /> : null}
      {ability.can('update', 'Equipment') ? <InspectionForm item={item} kinds={kinds} /> : null}
      {inspections.length ? (
        <div className="mt-4 overflow-x-auto">
          <table className="w-full text-sm">
            <caption className="sr-only">Inspections of {item.code}, newest first</caption>
            <thead>
              <tr className="text-left text-xs text-ink-muted uppercase">
                <th className="py-1.5 pr-3">When</th>
                <th className="py-1.5 pr-3">Inspection</th>
                <th className="py-1.5 pr-3">Result</th>
                <th className="py-1.5 whitespace-nowrap">Next due</th>
              </tr>
            </thead>
            <tbody className="divide-y divide-line">
              {inspections.map((i) => (
                <tr key={i.id}>
                  <td className="py-1.5 pr-3 whitespace-nowrap">{formatDate(i.at)}</td>
                  <td className="py-1.5 pr-3">
                    {inspectionKindLabels[i.kind]}
                    {i.note ? <span className="block text-xs text-ink-muted">{i.note}</span> : null}
                  </td>
                  <td className="py-1.5 pr-3">{i.passed ? <Badge tone="ready">Passed</Badge> : <Badge tone="danger">Failed</Badge>}</td>
                  <td className="py-1.5 whitespace-nowrap">{formatDate(i.nextDueAt)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      ) : null}
    </section>
  );
};

const CylinderBlock = ({ item, cylinder }: { item: Equipment; cylinder: CylinderView }) => {
  const ability = useAppAbility();
  const connect = useConnectCylinder(item.id);
  const refill = useRefillCylinder(item.id);
  const error = connect.error ?? refill.error;
  return (
    <div className="mt-4 rounded-md border border-line p-3 text-sm">
      <p>
        CO2 left: <strong>{cylinder.remainingKg} kg</strong> of {cylinder.sizeKg} kg ·{' '}
        {cylinder.connected ? <Badge tone="copper">On the gas line</Badge> : <span className="text-ink-muted">not connected</span>}
      </p>
      <p className="mt-1 text-xs text-ink-muted">CO2 recorded for keg fills and purges is taken off the cylinder on the gas line.</p>
      {ability.can('update', 'Equipment') ? (
        <div className="mt-2 flex flex-wrap gap-2">
          {!cylinder.connected ? (
            <Button variant="secondary" size="sm" disabled={connect.isPending} onClick={() => connect.mutate()}>
              Connect to the gas line
            </Button>
          ) : null}
          <Button variant="secondary" size="sm" disabled={refill.isPending} onClick={() => refill.mutate()}>
            Back full from the supplier
          </Button>
        </div>
      ) : null}
      {error ? (
        <Alert tone="error" title="Not done" className="mt-2">
          {problemMessage(error)}
        </Alert>
      ) : null}
      {cylinder.log.length ? (
        <ul className="mt-2 space-y-0.5 text-xs text-ink-muted">
          {cylinder.log.slice(0, 8).map((e) => (
            <li key={e.id}>
              {formatDateTime(e.at)} · {e.action}
              {e.kg ? ` ${e.kg} kg` : ''}
              {e.replacedCylinder ? ` (replaced ${e.replacedCylinder.code})` : ''} · {e.remainingKg} kg left
            </li>
          ))}
        </ul>
      ) : null}
    </div>
  );
};

const InspectionForm = ({ item, kinds }: { item: Equipment; kinds: readonly InspectionKind[] }) => {
  const mutation = useRecordInspection(item.id);
  const [kind, setKind] = useState<InspectionKind>(kinds[0]!);
  const [at, setAt] = useState(() => localInput(new Date()));
  const [passed, setPassed] = useState(true);
  const [nextDue, setNextDue] = useState('');
  const [note, setNote] = useState('');
  const [done, setDone] = useState<string | null>(null);
  const submit = async (e: FormEvent) => {
    e.preventDefault();
    setDone(null);
    try {
      await mutation.mutateAsync({
        kind,
        at: new Date(at).toISOString(),
        passed,
        ...(nextDue ? { nextDueAt: new Date(`${nextDue}T00:00`).toISOString() } : {}),
        ...(note.trim() ? { note: note.trim() } : {}),
      });
      setDone(`${inspectionKindLabels[kind]} recorded (${passed ? 'passed' : 'failed'}).`);
      setNote('');
      setNextDue('');
    } catch {
      // shown below
    }
  };
  return (
    <form onSubmit={submit} className="mt-4 flex flex-col gap-3 border-t border-line pt-3" aria-label="Record an inspection">
      <h3 className="text-sm font-semibold">Record an inspection</h3>
      <div className="grid gap-3 sm:grid-cols-2">
        <Field label="Inspection">
          {(c) => (
            <Select {...c} value={kind} onChange={(e) => setKind(e.target.value as InspectionKind)}>
              <Options values={kinds} labels={inspectionKindLabels} />
            </Select>
          )}
        </Field>
        <Field label="When">{(c) => <Input {...c} type="datetime-local" value={at} onChange={(e) => setAt(e.target.value)} required />}</Field>
        <fieldset className="flex flex-wrap gap-4 text-sm">
          <legend className="sr-only">Result</legend>
          <Radio name="passed" label="Passed" checked={passed} onChange={() => setPassed(true)} />
          <Radio name="passed" label="Failed" checked={!passed} onChange={() => setPassed(false)} />
        </fieldset>
        <Field label="Next due (optional)" hint="Empty: the co-op’s interval for this inspection (Settings).">
          {(c) => <Input {...c} type="date" value={nextDue} onChange={(e) => setNextDue(e.target.value)} />}
        </Field>
        <Field label="Note (optional)" className="sm:col-span-2">
          {(c) => <Input {...c} value={note} maxLength={1000} onChange={(e) => setNote(e.target.value)} placeholder="e.g. held 60 psi for 10 minutes" />}
        </Field>
      </div>
      <p className="text-xs text-ink-muted">
        Test only with the right fittings and a regulator with its own relief valve; never above the rated pressure. Local pressure-vessel codes and licensed
        testers decide what a test must be.
      </p>
      <div>
        <Button type="submit" disabled={mutation.isPending}>
          Record inspection
        </Button>
      </div>
      {mutation.isError ? (
        <Alert tone="error" title="Not recorded">
          {problemMessage(mutation.error)}
        </Alert>
      ) : null}
      {done ? <Alert tone="success" title={done} /> : null}
    </form>
  );
};
