import { stableGravity } from '../../../shared/brewing/index.ts';
import type { GravityStability } from '../../../shared/schemas/transfers.ts';
import type { Database } from '../../db/database.ts';
import { HttpProblem } from '../../lib/http-problem.ts';
import { loadFermentationSettings } from '../batches/figures.ts';
import { gravityReadings } from './transfers.repository.ts';

const MS_PER_DAY = 86_400_000;
/** How many of the latest readings a stability answer shows. */
const STABILITY_READINGS = 5;

/**
 * The co-op's "finished" rule (Settings, fermentation: the same gravity within a tolerance over a
 * span of days, shared/brewing stableGravity) applied to a batch's readings taken up to `at`.
 */
export async function gravityStability(db: Database, batchId: string, at: Date): Promise<GravityStability> {
  const [settings, rows] = await Promise.all([loadFermentationSettings(db), gravityReadings(db, batchId, at)]);
  const readings = rows.map((r) => ({ takenAt: r.taken_at, sg: Number(r.gravity_sg) }));
  const toleranceSg = settings.stableToleranceSg;
  const spanDays = settings.stableSpanDays;
  const result = stableGravity(readings, { toleranceSg, spanDays });
  // How long the latest gravity has held: the trailing run within the tolerance, as the rule counts it.
  let heldDays = 0;
  const latest = readings[readings.length - 1];
  if (latest && readings.length > 1) {
    let start = latest;
    for (let i = readings.length - 2; i >= 0; i -= 1) {
      if (Math.abs(readings[i]!.sg - latest.sg) > toleranceSg + 1e-9) break;
      start = readings[i]!;
    }
    heldDays = Math.round(((latest.takenAt.getTime() - start.takenAt.getTime()) / MS_PER_DAY) * 10) / 10;
  }
  return {
    stable: result.stable,
    since: result.since ?? null,
    toleranceSg,
    spanDays,
    heldDays,
    readings: readings.slice(-STABILITY_READINGS).map((r) => ({ takenAt: r.takenAt.toISOString(), sg: r.sg })),
  };
}

/** The 422 of a transfer whose batch's gravity is not yet stable and that gives no reason. */
export function gravityNotStable(batchName: string, s: GravityStability): HttpProblem {
  const last = s.readings.map((r) => `${r.sg.toFixed(3)} on ${r.takenAt.slice(0, 10)}`).join(', ');
  const needs = `the same gravity within ±${s.toleranceSg.toFixed(3)} over ${s.spanDays} day${s.spanDays === 1 ? '' : 's'}`;
  const seen =
    s.readings.length < 2
      ? `it has ${s.readings.length === 0 ? 'no readings' : 'one reading'}`
      : `the latest gravity has held ${s.heldDays} day${s.heldDays === 1 ? '' : 's'} (readings: ${last})`;
  return new HttpProblem(
    422,
    'Gravity not stable',
    `The gravity of ${batchName} is not stable yet: the co-op's rule needs ${needs}, and ${seen}. Transfer later, or give a reason to transfer now.`,
    [{ path: 'unstableGravityReason', message: 'The gravity is not stable: say why the beer goes into kegs now' }],
    'about:blank',
    { code: 'gravity_not_stable', stability: s },
  );
}
