import {
  findChemical,
  type ConcentrationUnit,
  type SanitationSettings,
  type SanitationStep,
} from '../schemas/cellar-settings.ts';

/**
 * The co-op's sanitation rules as pure code, shared by the server (which records the outcome)
 * and the checklist screen (which shows what the cycle will leave the vessel as, before it is
 * saved). A cycle is complete when it has, in this order, a clean with a chemical and at least
 * the minimum contact time, a rinse, a sanitize with a chemical and at least the minimum contact
 * time, and a purge with CO2. A complete cycle leaves the vessel `ready`; a cycle that cleaned
 * and rinsed properly but did not sanitize or purge properly leaves it `cleaned`; anything less
 * leaves it `needs_cleaning`. Every shortfall is named.
 */

export interface StepForRules {
  step: SanitationStep;
  chemical?: string | null | undefined;
  concentration?: number | null | undefined;
  contactMinutes?: number | null | undefined;
  at: string | Date;
  purgeMethod?: 'flush' | 'push_out' | null | undefined;
}

export type CycleOutcome = 'ready' | 'cleaned' | 'needs_cleaning';

export interface CycleIssue {
  code: 'missing_step' | 'out_of_order' | 'no_chemical' | 'no_contact_time' | 'short_contact' | 'wrong_chemical';
  step: SanitationStep;
  message: string;
}

export interface EvaluatedStep {
  /** Index in the submitted list. */
  index: number;
  step: SanitationStep;
  chemicalId: string | null;
  chemicalName: string | null;
  concentration: number | null;
  concentrationUnit: ConcentrationUnit | null;
  /** The minimum contact time that applied to this step (null: none). */
  minimumContactMinutes: number | null;
  ok: boolean;
}

export interface CycleEvaluation {
  outcome: CycleOutcome;
  complete: boolean;
  issues: CycleIssue[];
  /** Steps in time order (ties keep the submitted order). */
  steps: EvaluatedStep[];
  startedAt: Date;
  completedAt: Date;
  /** For a complete cycle: when its freshness window ends. */
  freshUntil: Date | null;
}

const stepOrder: SanitationStep[] = ['clean', 'rinse', 'sanitize', 'purge'];
const stepNames: Record<SanitationStep, string> = { clean: 'clean', rinse: 'rinse', sanitize: 'sanitize', purge: 'CO2 purge' };

function formatMinutes(m: number): string {
  if (m < 1) return `${Math.round(m * 60)} s`;
  return Number.isInteger(m) ? `${m} min` : `${m.toFixed(1)} min`;
}

export function evaluateCycle(input: readonly StepForRules[], settings: SanitationSettings): CycleEvaluation {
  if (input.length === 0) throw new RangeError('a cycle needs at least one step');
  const ordered = input
    .map((s, index) => ({ s, index, time: new Date(s.at).getTime() }))
    .sort((a, b) => a.time - b.time || a.index - b.index);
  const issues: CycleIssue[] = [];

  const steps: EvaluatedStep[] = ordered.map(({ s, index }) => {
    const known = s.step === 'clean' || s.step === 'sanitize' ? findChemical(settings, s.chemical) : undefined;
    const stepMinimum = s.step === 'clean' || s.step === 'sanitize' ? settings.minimumContactMinutes[s.step] : null;
    const minimum =
      stepMinimum === null ? null : Math.max(stepMinimum, known?.minimumContactMinutes ?? 0);
    return {
      index,
      step: s.step,
      chemicalId: known?.id ?? null,
      chemicalName: known?.name ?? (s.chemical?.trim() || null),
      concentration: s.concentration ?? (known ? known.defaultConcentration : null),
      concentrationUnit: known?.unit ?? null,
      minimumContactMinutes: minimum,
      ok: true,
    };
  });

  // Check each chemical step on its own.
  steps.forEach((st) => {
    if (st.step !== 'clean' && st.step !== 'sanitize') return;
    const raw = input[st.index]!;
    const name = stepNames[st.step];
    if (!st.chemicalName) {
      st.ok = false;
      issues.push({ code: 'no_chemical', step: st.step, message: `The ${name} step names no chemical.` });
    } else if (st.chemicalId) {
      const chem = settings.chemicals.find((c) => c.id === st.chemicalId)!;
      if (chem.step !== st.step) {
        st.ok = false;
        issues.push({
          code: 'wrong_chemical',
          step: st.step,
          message: `${chem.name} is a ${chem.step === 'clean' ? 'cleaner' : 'sanitizer'}, not a ${st.step === 'clean' ? 'cleaner' : 'sanitizer'}.`,
        });
      }
    }
    const contact = raw.contactMinutes;
    if (contact === null || contact === undefined) {
      st.ok = false;
      issues.push({ code: 'no_contact_time', step: st.step, message: `The ${name} step records no contact time.` });
    } else if (st.minimumContactMinutes !== null && contact < st.minimumContactMinutes) {
      st.ok = false;
      issues.push({
        code: 'short_contact',
        step: st.step,
        message: `Contact time of the ${name} step was ${formatMinutes(contact)}, below the co-op's minimum of ${formatMinutes(st.minimumContactMinutes)}.`,
      });
    }
  });

  // The sequence: each required step must follow the one before it.
  const anyOf = (step: SanitationStep) => steps.some((st) => st.step === step);
  let position = -1;
  let broken = false;
  const reached: Record<SanitationStep, boolean> = { clean: false, rinse: false, sanitize: false, purge: false };
  for (const step of stepOrder) {
    // The first good occurrence after the previous step.
    const i = steps.findIndex((st, j) => j > position && st.step === step && st.ok);
    if (i >= 0) {
      if (!broken) {
        reached[step] = true;
        position = i;
      }
      continue;
    }
    broken = true;
    if (!anyOf(step)) {
      issues.push({ code: 'missing_step', step, message: `No ${stepNames[step]} step.` });
    } else if (steps.some((st) => st.step === step && st.ok)) {
      issues.push({ code: 'out_of_order', step, message: `The ${stepNames[step]} step came before the step it must follow.` });
    }
    // A step that is present but not ok already has its issue.
  }

  const cleanedAndRinsed = reached.clean && reached.rinse;
  const complete = cleanedAndRinsed && reached.sanitize && reached.purge;
  const outcome: CycleOutcome = complete ? 'ready' : cleanedAndRinsed ? 'cleaned' : 'needs_cleaning';
  const startedAt = new Date(ordered[0]!.time);
  const completedAt = new Date(ordered[ordered.length - 1]!.time);
  const freshUntil = complete ? new Date(completedAt.getTime() + settings.freshnessDays * 86_400_000) : null;
  return { outcome, complete, issues, steps, startedAt, completedAt, freshUntil };
}

/** One line for people: why the cycle left the vessel as it did. */
export function outcomeReason(ev: Pick<CycleEvaluation, 'outcome' | 'issues'>, freshnessDays?: number): string {
  if (ev.outcome === 'ready') {
    return `Sanitation cycle complete${freshnessDays ? `; ready for ${freshnessDays} day${freshnessDays === 1 ? '' : 's'}` : ''}`;
  }
  const what = ev.outcome === 'cleaned' ? 'cleaned, not sanitized' : 'still needs cleaning';
  const why = ev.issues.map((i) => i.message).join(' ');
  return `Sanitation cycle incomplete, ${what}: ${why || 'steps missing.'}`;
}
