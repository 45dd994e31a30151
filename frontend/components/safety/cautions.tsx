import { carbonationCautions, chemicalCautions, deferToLocalCodes, pressureCautions } from '../../../shared/cellar/cautions.ts';
import { cn } from '@/utils/cn';

const sets = {
  chemicals: { title: 'Chemical safety', items: chemicalCautions },
  pressure: { title: 'Gas and pressure safety', items: pressureCautions },
  carbonation: { title: 'Pressure and CO2 safety', items: carbonationCautions },
} as const;

/** The safety cautions of the product brief, where chemicals, gas pressure or CO2 are involved. */
export const Cautions = ({ kind, className }: { kind: keyof typeof sets; className?: string }) => {
  const set = sets[kind];
  return (
    <aside aria-label={set.title} className={cn('rounded-md border border-danger/30 bg-danger-soft/60 px-3 py-2 text-sm text-danger-strong', className)}>
      <p className="font-semibold">{set.title}</p>
      <ul className="mt-1 list-disc space-y-0.5 pl-5">
        {set.items.map((c) => (
          <li key={c}>{c}</li>
        ))}
      </ul>
      <p className="mt-1 text-xs text-ink-muted">{deferToLocalCodes}</p>
    </aside>
  );
};
