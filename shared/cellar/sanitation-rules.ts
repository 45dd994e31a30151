import { findChemical, type Chemical, type ConcentrationUnit, type SanitationSettings, type SanitationStep } from '../schemas/cellar-settings.ts';

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
  /** Push-out purge: the keg the sanitizer (or beer) was pushed into. */
  pushedIntoEquipmentId?: string | null | undefined;
  /** Clean with a caustic chemical: the vessel was vented to atmospheric pressure first. */
  vented?: boolean | null | undefined;
  /** Why a step that breaks an exceptable rule was done that way; it is then recorded as an exception. */
  exceptionReason?: string | null | undefined;
}

export type CycleOutcome = 'ready' | 'cleaned' | 'needs_cleaning';

export interface CycleIssue {
  code: 'missing_step' | 'out_of_order' | 'no_chemical' | 'no_contact_time' | 'short_contact' | 'wrong_chemical' | 'exception';
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
  /** The exceptable rules this step broke and the reason it was done anyway (null: none broken). */
  exception: { reason: string; rules: StepRule[] } | null;
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
  const ordered = input.map((s, index) => ({ s, index, time: new Date(s.at).getTime() })).sort((a, b) => a.time - b.time || a.index - b.index);
  const issues: CycleIssue[] = [];
  const excepted = exceptionsOf(input, settings);

  const steps: EvaluatedStep[] = ordered.map(({ s, index }) => {
    const known = s.step === 'clean' || s.step === 'sanitize' ? findChemical(settings, s.chemical) : undefined;
    const stepMinimum = s.step === 'clean' || s.step === 'sanitize' ? settings.minimumContactMinutes[s.step] : null;
    const minimum = stepMinimum === null ? null : Math.max(stepMinimum, known?.minimumContactMinutes ?? 0);
    return {
      index,
      step: s.step,
      chemicalId: known?.id ?? null,
      chemicalName: known?.name ?? (s.chemical?.trim() || null),
      concentration: s.concentration ?? (known ? known.defaultConcentration : null),
      concentrationUnit: known?.unit ?? null,
      minimumContactMinutes: minimum,
      ok: true,
      exception: excepted.get(index) ?? null,
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
    } else if (st.minimumContactMinutes !== null && contact < st.minimumContactMinutes && !st.exception?.rules.includes('short_contact')) {
      st.ok = false;
      issues.push({
        code: 'short_contact',
        step: st.step,
        message: `Contact time of the ${name} step was ${formatMinutes(contact)}, below the co-op's minimum of ${formatMinutes(st.minimumContactMinutes)}.`,
      });
    }
  });

  // Exceptions: the step counts as done, and the cycle lists it with its reason.
  const violations = excepted.size ? checkSteps(input, settings) : [];
  steps.forEach((st) => {
    if (!st.exception) return;
    const broken = violations.filter((v) => v.index === st.index && v.exceptable).map((v) => v.message);
    issues.push({
      code: 'exception',
      step: st.step,
      message: `Recorded as an exception: ${broken.join(' ')} Reason given: ${st.exception.reason}`,
    });
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
  const why = ev.issues
    .filter((i) => i.code !== 'exception')
    .map((i) => i.message)
    .join(' ');
  return `Sanitation cycle incomplete, ${what}: ${why || 'steps missing.'}`;
}

/**
 * The checks a step must pass before it is recorded at all (POST /api/sanitation-cycles answers
 * 422 naming the step and the rule; the checklist shows the same message beside the step):
 * - `unknown_chemical`: a clean or sanitize step names a chemical that is not in the co-op's list.
 * - `wrong_chemical`: a cleaner used to sanitize, or a sanitizer to clean.
 * - `same_chemical`: one chemical named for both the clean and the sanitize step.
 * - `strength_low` / `strength_high`: the strength is outside the chemical's working range
 *   (`minConcentration`–`maxConcentration` in its unit; no strength given means its usual one).
 * - `short_contact`: the contact time is below the minimum (the larger of the co-op's minimum for
 *   the step and the chemical's own).
 * - `short_purge`: a timed CO2 flush shorter than the co-op's `minimumPurgeSeconds` (or with no time).
 * - `push_out_without_keg`: a push-out purge that names no keg it pushed into.
 * - `contact_exceeds_gap`: the steps' times contradict a stated contact time. Each step's `at` is
 *   when it began; its contact (or flush) time must end before the next step in time order begins
 *   (contact × 60 s ≤ next.at − at). The last step has no bound. So no stated contact time can be
 *   longer than the cycle's own started-to-completed span.
 * - `not_vented`: a clean with a caustic chemical without `vented: true` (caustic in a vessel still
 *   full of CO2 absorbs the gas and can collapse it).
 * The first seven are `exceptable`: a step that carries a non-empty `exceptionReason` is recorded as
 * an exception instead (it counts as done, so the cycle may still leave the vessel ready, and the
 * cycle's issues and the audit report list it with its reason). The last two are never exceptable:
 * a record that contradicts itself or a skipped vent is refused outright.
 */
export type StepRule =
  | 'unknown_chemical'
  | 'wrong_chemical'
  | 'same_chemical'
  | 'strength_low'
  | 'strength_high'
  | 'short_contact'
  | 'short_purge'
  | 'push_out_without_keg'
  | 'contact_exceeds_gap'
  | 'not_vented';

export interface StepViolation {
  /** Index in the submitted list. */
  index: number;
  step: SanitationStep;
  rule: StepRule;
  /** The field the rule is about, as a path inside the step (`concentration`, `contactMinutes`…). */
  field: 'chemical' | 'concentration' | 'contactMinutes' | 'pushedIntoEquipmentId' | 'vented';
  exceptable: boolean;
  message: string;
}

const exceptableRules: ReadonlySet<StepRule> = new Set<StepRule>([
  'unknown_chemical',
  'strength_low',
  'strength_high',
  'short_contact',
  'short_purge',
  'push_out_without_keg',
]);

const stepTitles: Record<SanitationStep, string> = { clean: 'Clean step', rinse: 'Rinse step', sanitize: 'Sanitize step', purge: 'Purge step' };
const trimNumber = (v: number) => String(Number(v.toFixed(3)));

/** The minimum contact time for a clean or sanitize step with this chemical (the larger of the co-op's and the chemical's). */
export function minimumContactFor(settings: SanitationSettings, step: 'clean' | 'sanitize', chemical: Chemical | undefined): number {
  return Math.max(settings.minimumContactMinutes[step], chemical?.minimumContactMinutes ?? 0);
}

/** Every rule the steps break, in the order of the submitted list (see the rules above). */
export function checkSteps(input: readonly StepForRules[], settings: SanitationSettings): StepViolation[] {
  const out: StepViolation[] = [];
  const add = (index: number, rule: StepRule, field: StepViolation['field'], message: string) =>
    out.push({ index, step: input[index]!.step, rule, field, exceptable: exceptableRules.has(rule), message: `${stepTitles[input[index]!.step]}: ${message}` });

  // Chemicals named for each chemical step, to catch one chemical used for both.
  const keyOf = (s: StepForRules) => {
    const known = findChemical(settings, s.chemical);
    return known ? known.id : s.chemical?.trim().toLowerCase() || null;
  };
  const cleanKeys = new Set(
    input
      .filter((s) => s.step === 'clean')
      .map(keyOf)
      .filter(Boolean),
  );

  input.forEach((s, i) => {
    if (s.step === 'clean' || s.step === 'sanitize') {
      const chem = findChemical(settings, s.chemical);
      const role = s.step === 'clean' ? 'cleaner' : 'sanitizer';
      if (s.chemical?.trim() && !chem) {
        add(i, 'unknown_chemical', 'chemical', `"${s.chemical.trim()}" is not a ${role} in the co-op's list.`);
      } else if (chem && chem.step !== s.step) {
        add(i, 'wrong_chemical', 'chemical', `${chem.name} is a ${chem.step === 'clean' ? 'cleaner' : 'sanitizer'}, not a ${role}.`);
      }
      if (s.step === 'sanitize') {
        const key = keyOf(s);
        if (key && cleanKeys.has(key)) add(i, 'same_chemical', 'chemical', `the same chemical was named for the clean; sanitize with a sanitizer.`);
      }
      if (chem && chem.step === s.step) {
        const strength = s.concentration ?? chem.defaultConcentration;
        const range = `${trimNumber(chem.minConcentration)}–${trimNumber(chem.maxConcentration)} ${chem.unit}`;
        if (strength < chem.minConcentration) {
          add(i, 'strength_low', 'concentration', `${trimNumber(strength)} ${chem.unit} is below the working strength of ${chem.name} (${range}).`);
        } else if (strength > chem.maxConcentration) {
          add(i, 'strength_high', 'concentration', `${trimNumber(strength)} ${chem.unit} is above the working strength of ${chem.name} (${range}).`);
        }
      }
      const minimum = minimumContactFor(settings, s.step, chem && chem.step === s.step ? chem : undefined);
      if (s.contactMinutes !== null && s.contactMinutes !== undefined && s.contactMinutes < minimum) {
        add(i, 'short_contact', 'contactMinutes', `contact time ${formatMinutes(s.contactMinutes)} is below the minimum of ${formatMinutes(minimum)}.`);
      }
      if (s.step === 'clean' && chem?.caustic && s.vented !== true) {
        add(
          i,
          'not_vented',
          'vented',
          `${chem.name} is caustic: vent the vessel to atmospheric pressure first and confirm it (caustic absorbs CO2 and can collapse a closed vessel).`,
        );
      }
    }
    if (s.step === 'purge') {
      if ((s.purgeMethod ?? 'flush') === 'flush') {
        const seconds = (s.contactMinutes ?? 0) * 60;
        if (seconds < settings.minimumPurgeSeconds) {
          add(i, 'short_purge', 'contactMinutes', `a CO2 flush of ${Math.round(seconds)} s is below the co-op's minimum of ${settings.minimumPurgeSeconds} s.`);
        }
      } else if (!s.pushedIntoEquipmentId) {
        add(i, 'push_out_without_keg', 'pushedIntoEquipmentId', 'a push-out purge names the keg the sanitizer was pushed into.');
      }
    }
  });

  // Times against stated contact times: each step's contact must end before the next step begins.
  const ordered = input.map((s, index) => ({ s, index, time: new Date(s.at).getTime() })).sort((a, b) => a.time - b.time || a.index - b.index);
  ordered.forEach((cur, k) => {
    const next = ordered[k + 1];
    const contact = cur.s.step === 'rinse' ? null : cur.s.contactMinutes;
    if (!next || contact === null || contact === undefined) return;
    const gapMinutes = (next.time - cur.time) / 60_000;
    if (contact * 60_000 > next.time - cur.time) {
      add(
        cur.index,
        'contact_exceeds_gap',
        'contactMinutes',
        `a contact time of ${formatMinutes(contact)} does not fit before the ${stepNames[next.s.step]} step, ${formatMinutes(gapMinutes)} later; correct the times or the contact time.`,
      );
    }
  });
  return out.sort((a, b) => a.index - b.index);
}

/** Steps that break only exceptable rules and carry a reason: index → the exception. */
export function exceptionsOf(input: readonly StepForRules[], settings: SanitationSettings): Map<number, { reason: string; rules: StepRule[] }> {
  const byIndex = new Map<number, { reason: string; rules: StepRule[] }>();
  for (const v of checkSteps(input, settings)) {
    const reason = input[v.index]!.exceptionReason?.trim();
    if (!v.exceptable || !reason) continue;
    const e = byIndex.get(v.index) ?? { reason, rules: [] };
    e.rules.push(v.rule);
    byIndex.set(v.index, e);
  }
  return byIndex;
}

/** The violations that stop a cycle being recorded: every non-exceptable one, and exceptable ones on steps without a reason. */
export function blockingViolations(input: readonly StepForRules[], settings: SanitationSettings): StepViolation[] {
  return checkSteps(input, settings).filter((v) => !v.exceptable || !input[v.index]!.exceptionReason?.trim());
}
