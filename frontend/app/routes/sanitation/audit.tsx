import { useState } from 'react';
import { Forbidden } from '@/components/errors/forbidden';
import { Button } from '@/components/ui/button';
import { Field } from '@/components/ui/field';
import { Input, Select } from '@/components/ui/input';
import { auditReportHref, useVesselStatus } from '@/features/sanitation/api/sanitation';
import { useDocumentTitle } from '@/hooks/use-document-title';
import { useAppAbility } from '@/lib/ability';

const iso = (d: Date) => d.toISOString().slice(0, 10);

/** The audit report form: a period and a set of vessels give a PDF for members, inspectors and insurers. */
const SanitationAuditRoute = () => {
  useDocumentTitle('Sanitation audit');
  const ability = useAppAbility();
  const now = new Date();
  const [from, setFrom] = useState(iso(new Date(now.getFullYear(), now.getMonth() - 3, 1)));
  const [to, setTo] = useState(iso(new Date(now.getFullYear(), now.getMonth(), 0)));
  const [kind, setKind] = useState<'' | 'fermenter' | 'keg'>('');
  const [picked, setPicked] = useState<string[]>([]);
  const vessels = useVesselStatus({ kind: kind || undefined, sort: 'code', order: 'asc', pageSize: 100 });
  if (!ability.can('read', 'SanitationAudit')) return <Forbidden what="the sanitation audit" />;
  const invalid = !from || !to || from > to;
  const href = auditReportHref({ from, to, kind: kind || undefined, equipmentId: picked });
  return (
    <form
      className="flex max-w-3xl flex-col gap-4 rounded-lg border border-line bg-surface p-4"
      onSubmit={(e) => {
        e.preventDefault();
        if (!invalid) window.open(href, '_blank', 'noopener');
      }}
      aria-label="Sanitation audit report"
    >
      <p className="text-sm text-ink-muted">
        Every cycle with its steps, chemicals, strengths, times and people; every fill with the cycle before it; flagged exceptions (fills without a current
        cycle, late cycles, short contact times, lapsed windows, steps recorded against a rule with their reasons); a summary per vessel.
      </p>
      <div className="grid gap-3 sm:grid-cols-3">
        <Field label="From" error={invalid && from > to ? 'From must not be after to' : undefined}>
          {(c) => <Input {...c} type="date" value={from} onChange={(e) => setFrom(e.target.value)} required />}
        </Field>
        <Field label="To">{(c) => <Input {...c} type="date" value={to} onChange={(e) => setTo(e.target.value)} required />}</Field>
        <Field label="Vessels">
          {(c) => (
            <Select {...c} value={kind} onChange={(e) => (setKind(e.target.value as typeof kind), setPicked([]))}>
              <option value="">Fermenters and kegs</option>
              <option value="fermenter">Fermenters only</option>
              <option value="keg">Kegs only</option>
            </Select>
          )}
        </Field>
      </div>
      <Field label="Only these vessels (optional)" hint="Hold Ctrl or ⌘ to pick several; none picked means all of the kind above.">
        {(c) => (
          <select
            {...c}
            multiple
            value={picked}
            onChange={(e) => setPicked(Array.from(e.target.selectedOptions).map((o) => o.value))}
            className="min-h-40 rounded-md border border-line-strong bg-surface px-2 py-1 text-sm"
          >
            {vessels.data?.items.map((v) => (
              <option key={v.id} value={v.id}>
                {v.code} · {v.name}
              </option>
            ))}
          </select>
        )}
      </Field>
      <div className="flex flex-wrap items-center gap-3">
        <Button type="submit" disabled={invalid}>
          Open the report (PDF)
        </Button>
        <a href={invalid ? undefined : href} download className="text-sm">
          Download
        </a>
      </div>
    </form>
  );
};

export default SanitationAuditRoute;
