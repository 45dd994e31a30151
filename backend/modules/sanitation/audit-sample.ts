import { defaultSanitationSettings, type SanitationStep } from '../../../shared/schemas/cellar-settings.ts';
import type { PdfCoop } from '../../lib/pdf-frame.ts';
import type { AuditCycle, AuditData, AuditVessel } from './audit-report-data.ts';

// A made-up year of sanitation for a few vessels, in memory only: what the render threads lay out once at
// start (so the layout code is compiled before the first real report) and what the audit's layout tests
// check. Every cycle has the four steps; every eleventh is short of contact time and so an exception; every
// other cycle of a keg is followed by a fill.

const DAY = 86_400_000;
const stepKinds: SanitationStep[] = ['clean', 'rinse', 'sanitize', 'purge'];

function cycle(from: Date, vessel: number, i: number): AuditCycle {
  const start = from.getTime() + (i * 5 + vessel) * DAY;
  const late = (vessel + i) % 11 === 0;
  return {
    id: `c-${vessel}-${i}`,
    startedAt: new Date(start),
    completedAt: new Date(start + 90 * 60_000),
    outcome: late ? 'needs_cleaning' : 'ready',
    complete: !late,
    issues: late ? [{ code: 'short_contact', message: 'Sanitize contact was 0.5 min; at least 2 min.' }] : [],
    freshUntil: late ? null : new Date(start + 7 * DAY),
    recordedBy: 'Ada Kettleby',
    steps: stepKinds.map((step, k) => ({
      step,
      chemical: step === 'clean' ? 'alkaline-cleaner' : step === 'sanitize' ? 'acid-sanitizer' : null,
      concentration: step === 'clean' ? 2 : null,
      unit: step === 'clean' ? '%' : null,
      contactMinutes: step === 'rinse' ? null : late && step === 'sanitize' ? 0.5 : 2,
      minimumContactMinutes: null,
      purgeMethod: step === 'purge' ? 'timed_flush' : null,
      at: new Date(start + k * 20 * 60_000),
      by: k % 2 ? 'Bram Whitlock' : 'Ada Kettleby',
      ok: !(late && step === 'sanitize'),
      exceptionReason: null,
    })),
  };
}

/** A year from `from` for one vessel per entry of `vesselCycles` (that many cycles each): fermenters first, then kegs. */
export function sampleAudit({ vesselCycles, from, coop }: { vesselCycles: number[]; from: Date; coop: PdfCoop }): AuditData {
  const vessels: AuditVessel[] = vesselCycles.map((cycles, v) => {
    const keg = v >= Math.ceil(vesselCycles.length / 2);
    const code = keg ? `K-00${v}` : `F-0${v + 1}`;
    const list = Array.from({ length: cycles }, (_, i) => cycle(from, v, i));
    return {
      id: `v-${v}`,
      code,
      name: keg ? `19 L keg ${v}` : `Fermenter ${v + 1}`,
      kind: keg ? 'keg' : 'fermenter',
      cycles: list,
      fills: keg
        ? list
            .filter((_, i) => i % 2 === 0)
            .map((c) => ({
              at: new Date(c.completedAt.getTime() + DAY),
              batch: 'Yard pale',
              volumeLiters: 18.5,
              cycle: { id: c.id, completedAt: c.completedAt, complete: c.complete, freshUntil: c.freshUntil, outcome: c.outcome },
            }))
        : [],
      exceptions: list
        .filter((c) => !c.complete)
        .map((c) => ({ vesselCode: code, at: c.completedAt, kind: 'short_contact' as const, message: 'Sanitize contact was 0.5 min; at least 2 min.' })),
    };
  });
  const to = new Date(Date.UTC(from.getUTCFullYear() + 1, from.getUTCMonth(), from.getUTCDate()));
  return {
    from,
    to,
    producedAt: new Date(to.getTime() + DAY + 9.5 * 3_600_000),
    coop,
    vessels,
    exceptions: vessels.flatMap((v) => v.exceptions).sort((a, b) => a.at.getTime() - b.at.getTime()),
    settings: defaultSanitationSettings,
  };
}
