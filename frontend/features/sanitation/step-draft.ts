import type { SanitationSettings, SanitationStep } from '../../../shared/schemas/cellar-settings.ts';
import type { SanitationStepInput } from '../../../shared/schemas/sanitation.ts';

/** What the checklist holds for one step while it is being filled in, and how it becomes the API's step. */
export interface StepDraft {
  done: boolean;
  /** `datetime-local` value in the phone's time zone. */
  at: string;
  chemical: string;
  concentration: string;
  contactMinutes: string;
  purgeMethod: 'flush' | 'push_out';
  purgeSeconds: string;
  /** Push-out purge: the keg the sanitizer went into. */
  pushedInto: string;
  /** Caustic clean: vented to atmospheric pressure first. */
  vented: boolean;
  /** Why a step outside the co-op's rules was done anyway (recorded as an exception). */
  exceptionReason: string;
}

const pad = (n: number) => String(n).padStart(2, '0');
export function localNow(d = new Date()): string {
  return `${d.getFullYear()}-${pad(d.getMonth() + 1)}-${pad(d.getDate())}T${pad(d.getHours())}:${pad(d.getMinutes())}`;
}
export const toIso = (local: string) => new Date(local).toISOString();
export const num = (v: string) => (v.trim() === '' || Number.isNaN(Number(v)) ? undefined : Number(v));

export function initialDraft(step: SanitationStep, settings: SanitationSettings): StepDraft {
  const first = settings.chemicals.find((c) => c.active && c.step === step);
  return {
    done: false,
    at: localNow(),
    chemical: first?.id ?? '',
    concentration: first ? String(first.defaultConcentration) : '',
    contactMinutes: first ? String(first.recommendedContactMinutes) : '',
    purgeMethod: 'flush',
    purgeSeconds: '30',
    pushedInto: '',
    vented: false,
    exceptionReason: '',
  };
}

export function toInput(step: SanitationStep, d: StepDraft, settings: SanitationSettings): SanitationStepInput {
  const at = toIso(d.at);
  const exception = d.exceptionReason.trim() ? { exceptionReason: d.exceptionReason.trim() } : {};
  if (step === 'rinse') return { step, at };
  if (step === 'purge') {
    const seconds = num(d.purgeSeconds);
    return d.purgeMethod === 'push_out'
      ? { step, at, purgeMethod: 'push_out', ...(d.pushedInto ? { pushedIntoEquipmentId: d.pushedInto } : {}), ...exception }
      : { step, at, purgeMethod: 'flush', ...(seconds !== undefined ? { contactMinutes: seconds / 60 } : {}), ...exception };
  }
  const concentration = num(d.concentration);
  const contact = num(d.contactMinutes);
  const caustic = step === 'clean' && settings.chemicals.find((c) => c.id === d.chemical)?.caustic;
  return {
    step,
    at,
    ...(d.chemical ? { chemical: d.chemical } : {}),
    ...(concentration !== undefined && concentration > 0 ? { concentration } : {}),
    ...(contact !== undefined ? { contactMinutes: contact } : {}),
    ...(caustic ? { vented: d.vented } : {}),
    ...exception,
  };
}

export const outcomeText = {
  ready: { label: 'Ready', tone: 'ready' as const, line: 'The vessel will be ready to fill.' },
  cleaned: { label: 'Cleaned', tone: 'muted' as const, line: 'The vessel will be cleaned but not ready: it still needs a proper sanitize and purge.' },
  needs_cleaning: { label: 'Needs cleaning', tone: 'due' as const, line: 'The vessel will still need cleaning.' },
};
