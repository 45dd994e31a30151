import { useMemo, useState } from 'react';
import { causticCo2Warning } from '../../../../shared/cellar/cautions.ts';
import { checkSteps, evaluateCycle, minimumContactFor, type StepForRules, type StepViolation } from '../../../../shared/cellar/sanitation-rules.ts';
import {
  defaultSanitationSettings,
  sanitationStepLabels,
  sanitationSteps,
  type SanitationSettings,
  type SanitationStep,
} from '../../../../shared/schemas/cellar-settings.ts';
import type { SanitationCycleView } from '../../../../shared/schemas/sanitation.ts';
import { Alert } from '@/components/ui/alert';
import { Badge } from '@/components/ui/badge';
import { Button } from '@/components/ui/button';
import { Checkbox } from '@/components/ui/input';
import { useContinueCycle, useRecordCycle, useVesselStatus } from '@/features/sanitation/api/sanitation';
import { Cautions } from '@/components/safety/cautions';
import { BigAmount, BigChoice, BigInput, BigSelect, bigButton } from '@/components/ui/touch';
import { isApiProblem, problemMessage } from '@/lib/api-client';
import { formatDateTime } from '@/utils/format';
import { StepProblems } from '@/features/sanitation/components/step-problems';
import { type StepDraft, localNow, initialDraft, toInput, outcomeText } from '@/features/sanitation/step-draft';

export interface SanitationChecklistProps {
  vessel: { id: string; code: string };
  settings: SanitationSettings | undefined;
  /** The vessel's latest cycle, when it is incomplete and can be continued. */
  openCycle: SanitationCycleView | null;
  onSaved: (result: { cycle: SanitationCycleView; equipment: { id: string; code: string; state: string } }) => void;
}

/** The phone checklist for one cycle: clean, rinse, sanitize, purge, each with who-and-when taken from the phone. */
export const SanitationChecklist = ({ vessel, settings = defaultSanitationSettings, openCycle, onSaved }: SanitationChecklistProps) => {
  const [continuing, setContinuing] = useState(Boolean(openCycle));
  const carried = useMemo(() => new Set(continuing && openCycle ? openCycle.steps.map((s) => s.step) : []), [continuing, openCycle]);
  const [drafts, setDrafts] = useState<Record<SanitationStep, StepDraft>>(() => ({
    clean: initialDraft('clean', settings),
    rinse: initialDraft('rinse', settings),
    sanitize: initialDraft('sanitize', settings),
    purge: initialDraft('purge', settings),
  }));
  const record = useRecordCycle();
  const cont = useContinueCycle();
  const [error, setError] = useState<string | null>(null);
  /** The server's field errors, by step (a 422 names steps by their index in what was sent). */
  const [serverErrors, setServerErrors] = useState<Partial<Record<SanitationStep, string[]>>>({});
  const kegs = useVesselStatus({ kind: 'keg', sort: 'code', order: 'asc', pageSize: 100 });

  const set = (step: SanitationStep, patch: Partial<StepDraft>) => {
    setServerErrors((e) => ({ ...e, [step]: undefined }));
    setError(null);
    setDrafts((d) => ({ ...d, [step]: { ...d[step], ...patch } }));
  };
  const pickChemical = (step: SanitationStep, id: string) => {
    const c = settings.chemicals.find((x) => x.id === id);
    set(step, { chemical: id, ...(c ? { concentration: String(c.defaultConcentration), contactMinutes: String(c.recommendedContactMinutes) } : {}) });
  };

  const newSteps = sanitationSteps.filter((s) => drafts[s].done && !carried.has(s)).map((s) => toInput(s, drafts[s], settings));
  const { preview, problems } = useMemo(() => {
    const previous: StepForRules[] =
      continuing && openCycle
        ? openCycle.steps.map((s) => ({
            step: s.step,
            chemical: s.chemicalId ?? s.chemical,
            concentration: s.concentration,
            contactMinutes: s.contactMinutes,
            at: s.at,
            purgeMethod: s.purgeMethod,
            pushedIntoEquipmentId: s.pushedInto?.id,
            vented: s.vented,
            exceptionReason: s.exceptionReason,
          }))
        : [];
    const all = [...previous, ...newSteps];
    // The same rules the server applies, shown beside each step before anything is sent.
    const byStep: Partial<Record<SanitationStep, StepViolation[]>> = {};
    for (const v of all.length ? checkSteps(all, settings) : []) {
      if (v.index < previous.length) continue;
      (byStep[v.step] ??= []).push(v);
    }
    return { preview: all.length ? evaluateCycle(all, settings) : null, problems: byStep };
    // eslint-disable-next-line react-hooks/exhaustive-deps -- the drafts are compared by value, not by identity
  }, [JSON.stringify(newSteps), continuing, openCycle, settings]);
  const refused = sanitationSteps.some((s) => (problems[s] ?? []).some((v) => !v.exceptable || !drafts[s].exceptionReason.trim()));

  const save = async () => {
    setError(null);
    setServerErrors({});
    if (refused) {
      setError('Some steps break the co-op’s rules: correct them, or give a reason to record them as exceptions (see the steps marked above).');
      return;
    }
    // A reason typed for a rule the step no longer breaks (the value was corrected) is not sent.
    const steps = newSteps.map(({ exceptionReason, ...rest }) =>
      exceptionReason && (problems[rest.step] ?? []).some((v) => v.exceptable) ? { ...rest, exceptionReason } : rest,
    );
    try {
      const result =
        continuing && openCycle ? await cont.mutateAsync({ cycleId: openCycle.id, steps }) : await record.mutateAsync({ equipmentId: vessel.id, steps });
      onSaved(result);
    } catch (e) {
      setError(problemMessage(e));
      const byStep: Partial<Record<SanitationStep, string[]>> = {};
      for (const fe of isApiProblem(e) ? e.errors : []) {
        const m = /^steps\.(\d+)\./.exec(fe.path);
        const step = m ? newSteps[Number(m[1])]?.step : undefined;
        if (step) (byStep[step] ??= []).push(fe.message);
      }
      setServerErrors(byStep);
    }
  };

  const chemicalsFor = (step: SanitationStep) => settings.chemicals.filter((c) => c.step === step && (c.active || c.id === drafts[step].chemical));
  const unitOf = (step: SanitationStep) => settings.chemicals.find((c) => c.id === drafts[step].chemical)?.unit ?? '';
  const chemicalOf = (step: SanitationStep) => settings.chemicals.find((c) => c.id === drafts[step].chemical && c.step === step);
  const minimum = (step: 'clean' | 'sanitize') => minimumContactFor(settings, step, chemicalOf(step));

  return (
    <div className="flex flex-col gap-4">
      {openCycle ? (
        <Alert tone="info" title={`Cleaned ${formatDateTime(openCycle.completedAt)}, not yet sanitized`}>
          <p>
            The last cycle on {vessel.code} stopped after {openCycle.steps.map((s) => sanitationStepLabels[s.step].toLowerCase()).join(', ')}.
          </p>
          <div className="mt-2 flex flex-wrap gap-2">
            <Button variant={continuing ? 'primary' : 'secondary'} className={bigButton} onClick={() => setContinuing(true)} aria-pressed={continuing}>
              Continue that cycle
            </Button>
            <Button variant={continuing ? 'secondary' : 'primary'} className={bigButton} onClick={() => setContinuing(false)} aria-pressed={!continuing}>
              Start a new cycle
            </Button>
          </div>
        </Alert>
      ) : null}

      <ol className="flex flex-col gap-3" aria-label={`Cycle steps for ${vessel.code}`}>
        {sanitationSteps.map((step, i) => {
          const d = drafts[step];
          const isCarried = carried.has(step);
          const stepId = `step-${step}`;
          return (
            <li
              key={step}
              className={`rounded-lg border bg-surface p-3 ${d.done || isCarried ? 'border-hop' : 'border-line'}`}
              aria-labelledby={`${stepId}-title`}
            >
              <div className="flex items-center justify-between gap-3">
                <h3 id={`${stepId}-title`} className="text-lg">
                  <span className="mr-2 text-ink-muted">{i + 1}.</span>
                  {sanitationStepLabels[step]}
                </h3>
                {isCarried ? (
                  <Badge tone="ready">Done earlier</Badge>
                ) : (
                  <Button
                    variant={d.done ? 'primary' : 'secondary'}
                    className={`${bigButton} min-w-32`}
                    aria-pressed={d.done}
                    onClick={() => set(step, d.done ? { done: false } : { done: true, at: localNow() })}
                  >
                    {d.done ? 'Done ✓' : `Mark ${sanitationStepLabels[step].split(' ')[0]!.toLowerCase()} done`}
                  </Button>
                )}
              </div>
              {isCarried ? null : (
                <div className="mt-3 grid gap-3 sm:grid-cols-2">
                  {step === 'clean' || step === 'sanitize' ? (
                    <>
                      <label className="flex flex-col gap-1 text-sm font-medium sm:col-span-2">
                        {step === 'clean' ? 'Cleaner' : 'Sanitizer'}
                        <BigSelect value={d.chemical} onChange={(e) => pickChemical(step, e.target.value)}>
                          {chemicalsFor(step).map((c) => (
                            <option key={c.id} value={c.id}>
                              {c.name}
                            </option>
                          ))}
                        </BigSelect>
                      </label>
                      <label className="flex flex-col gap-1 text-sm font-medium">
                        Strength {unitOf(step) ? `(${unitOf(step)})` : ''}
                        <BigAmount value={d.concentration} onChange={(e) => set(step, { concentration: e.target.value })} />
                      </label>
                      <label className="flex flex-col gap-1 text-sm font-medium">
                        {step === 'clean' ? 'Soak time (minutes)' : 'Contact time (minutes)'}
                        <BigAmount value={d.contactMinutes} onChange={(e) => set(step, { contactMinutes: e.target.value })} />
                        <span className="text-xs font-normal text-ink-muted">The co-op’s minimum: {minimum(step)} min</span>
                      </label>
                      {chemicalOf(step) ? (
                        <p className="text-xs text-ink-muted sm:col-span-2">
                          Working strength of {chemicalOf(step)!.name}: {chemicalOf(step)!.minConcentration}–{chemicalOf(step)!.maxConcentration}{' '}
                          {chemicalOf(step)!.unit}
                        </p>
                      ) : null}
                      {step === 'clean' && chemicalOf(step)?.caustic ? (
                        <div className="flex flex-col gap-2 sm:col-span-2">
                          <Alert tone="error" title="Caustic: vent the CO2 first">
                            {causticCo2Warning}
                          </Alert>
                          <Checkbox
                            className="min-h-12 rounded-md border border-line-strong bg-surface px-3 py-2 text-base"
                            label={`I vented ${vessel.code} to atmospheric pressure before the caustic went in`}
                            checked={d.vented}
                            onChange={(e) => set(step, { vented: e.target.checked })}
                          />
                        </div>
                      ) : null}
                    </>
                  ) : null}
                  {step === 'purge' ? (
                    <>
                      <fieldset className="flex flex-col gap-2 sm:col-span-2">
                        <legend className="mb-1 text-sm font-medium">How</legend>
                        <div className="flex flex-col gap-2 sm:flex-row">
                          <BigChoice
                            name={`${vessel.id}-purge`}
                            label="Timed CO2 flush"
                            checked={d.purgeMethod === 'flush'}
                            onChange={() => set(step, { purgeMethod: 'flush' })}
                          />
                          <BigChoice
                            name={`${vessel.id}-purge`}
                            label="Push the sanitizer out with CO2"
                            description="Into another keg"
                            checked={d.purgeMethod === 'push_out'}
                            onChange={() => set(step, { purgeMethod: 'push_out' })}
                          />
                        </div>
                      </fieldset>
                      {d.purgeMethod === 'flush' ? (
                        <label className="flex flex-col gap-1 text-sm font-medium">
                          Flush (seconds)
                          <BigInput
                            type="number"
                            inputMode="numeric"
                            min={0}
                            value={d.purgeSeconds}
                            onChange={(e) => set(step, { purgeSeconds: e.target.value })}
                          />
                          <span className="text-xs font-normal text-ink-muted">The co-op’s minimum: {settings.minimumPurgeSeconds} s</span>
                        </label>
                      ) : (
                        <label className="flex flex-col gap-1 text-sm font-medium">
                          Pushed into keg
                          <BigSelect value={d.pushedInto} onChange={(e) => set(step, { pushedInto: e.target.value })}>
                            <option value="">Pick the keg…</option>
                            {kegs.data?.items
                              .filter((k) => k.id !== vessel.id)
                              .map((k) => (
                                <option key={k.id} value={k.id}>
                                  {k.code}
                                </option>
                              ))}
                          </BigSelect>
                        </label>
                      )}
                    </>
                  ) : null}
                  <label className="flex flex-col gap-1 text-sm font-medium">
                    When
                    <BigInput
                      type="datetime-local"
                      value={d.at}
                      max={localNow(new Date(Date.now() + 5 * 60_000))}
                      onChange={(e) => set(step, { at: e.target.value })}
                    />
                  </label>
                </div>
              )}
              {isCarried ? null : (
                <StepProblems
                  id={`${stepId}-problems`}
                  problems={d.done ? (problems[step] ?? []) : []}
                  server={serverErrors[step] ?? []}
                  reason={d.exceptionReason}
                  onReason={(v) => set(step, { exceptionReason: v })}
                />
              )}
            </li>
          );
        })}
      </ol>

      {preview && refused ? (
        <section aria-live="polite" className="rounded-lg border border-danger/40 bg-danger-soft p-3 text-danger-strong">
          <p className="text-base font-medium">This cycle cannot be saved as it stands.</p>
          <p className="mt-1 text-sm">Correct the steps marked above, or give a reason where a step may be recorded as an exception.</p>
        </section>
      ) : preview ? (
        <section aria-live="polite" className="rounded-lg border border-line bg-ground-deep p-3">
          <p className="flex flex-wrap items-center gap-2 text-base">
            This cycle leaves {vessel.code}: <Badge tone={outcomeText[preview.outcome].tone}>{outcomeText[preview.outcome].label}</Badge>
          </p>
          <p className="mt-1 text-sm text-ink-muted">{outcomeText[preview.outcome].line}</p>
          {preview.issues.length ? (
            <ul className="mt-2 list-disc pl-5 text-sm text-due-strong">
              {preview.issues.map((i) => (
                <li key={`${i.code}-${i.step}`}>{i.message}</li>
              ))}
            </ul>
          ) : null}
        </section>
      ) : null}

      {error ? (
        <Alert tone="error" title="Not saved">
          {error}
        </Alert>
      ) : null}
      <Button className={`${bigButton} w-full`} onClick={save} pending={record.isPending || cont.isPending} disabled={newSteps.length === 0}>
        {newSteps.length === 0 ? 'Mark the steps you did' : continuing ? 'Save the rest of the cycle' : 'Save cycle'}
      </Button>
      <Cautions kind="chemicals" />
    </div>
  );
};
