import { checkLine, planCarbonation } from '../../../shared/cellar/carbonation-planner.ts';
import type { LineMaterial } from '../../../shared/brewing/index.ts';
import type { CarbonationSettings } from '../../../shared/schemas/cellar-settings.ts';
import type { CarbonationPlanView, LineCheckView } from '../../../shared/schemas/carbonation.ts';
import type { Page } from '../../../shared/schemas/pagination.ts';
import type { Database } from '../../db/database.ts';
import { pageOfViews } from '../../lib/paginate.ts';
import { getSetting } from '../settings/settings.service.ts';
import { planPage, planRows, type PlanListQuery } from './carbonation.repository.ts';

/** Carbonation plans as the API shows them: one plan, a page of plans, and whose keg a plan is on. */

const iso = (d: Date | string | null | undefined) => (d ? new Date(d).toISOString() : null);
const num = (v: unknown) => (v === null || v === undefined ? null : Number(v));

export async function carbonationSettings(db: Database): Promise<CarbonationSettings> {
  return (await getSetting(db, 'carbonation')).value;
}

export async function planViews(db: Database, ids: string[]): Promise<CarbonationPlanView[]> {
  if (!ids.length) return [];
  const rows = await planRows(db, ids);
  const settings = await carbonationSettings(db);
  const byId = new Map(
    rows.map((r): [string, CarbonationPlanView] => {
      // Warnings and the fast start's equilibrium are worked out again from the stored inputs.
      let warnings: string[];
      let equilibrium: number | null = null;
      try {
        const again = planCarbonation({
          targetVolumes: Number(r.target_volumes),
          temperatureC: Number(r.temperature_c),
          altitudeM: Number(r.altitude_m),
          method: r.method,
          startedAt: r.started_at,
          holdDays: num(r.hold_days) ?? settings.holdDays,
          fastStartPressureKpa: num(r.fast_pressure_kpa) ?? undefined,
          fastStartHours: num(r.fast_hours) ?? undefined,
          settleDays: num(r.settle_days) ?? undefined,
          maxPressureKpa: Math.max(settings.maxPlanPressureKpa, Number(r.serving_pressure_kpa), num(r.fast_pressure_kpa) ?? 0),
        });
        warnings = again.warnings;
        equilibrium = again.fastStartEquilibriumVolumes;
      } catch {
        warnings = [];
      }
      const line: LineCheckView | null =
        r.line_length_m !== null && r.line_inside_diameter_mm !== null
          ? {
              tapId: r.tap_id,
              lengthM: Number(r.line_length_m),
              insideDiameterMm: Number(r.line_inside_diameter_mm),
              riseM: Number(r.line_rise_m ?? 0),
              material: r.line_material,
              ...checkLine({
                servingPressureKpa: Number(r.serving_pressure_kpa),
                lengthM: Number(r.line_length_m),
                insideDiameterMm: Number(r.line_inside_diameter_mm),
                riseM: Number(r.line_rise_m ?? 0),
                fixedKpa: settings.lineFixedKpa,
                material: r.line_material as LineMaterial | null,
                resistanceKpaPerM: num(r.line_resistance_kpa_per_m) ?? undefined,
              }),
            }
          : null;
      return [
        r.id,
        {
          id: r.id,
          keg: { id: r.keg_id, code: r.keg_code },
          fillId: r.keg_fill_id,
          batchName: r.batch_name ?? null,
          state: r.state,
          method: r.method,
          styleFamily: r.style_family,
          targetVolumes: Number(r.target_volumes),
          temperatureC: Number(r.temperature_c),
          altitudeM: Number(r.altitude_m),
          servingPressureKpa: Number(r.serving_pressure_kpa),
          fastPressureKpa: num(r.fast_pressure_kpa),
          fastHours: num(r.fast_hours),
          holdDays: num(r.hold_days),
          settleDays: num(r.settle_days),
          startedAt: r.started_at.toISOString(),
          lowerPressureAt: iso(r.lower_pressure_at),
          pressureLoweredAt: iso(r.pressure_lowered_at),
          reminderSentAt: iso(r.reminder_sent_at),
          readyAt: r.ready_at.toISOString(),
          fastStartEquilibriumVolumes: equilibrium,
          warnings,
          line,
          notes: r.notes,
          createdBy: r.created_by ? { id: r.created_by, name: r.created_by_name ?? '' } : null,
          createdAt: r.created_at.toISOString(),
        },
      ];
    }),
  );
  return ids.map((id) => byId.get(id)).filter((v): v is CarbonationPlanView => Boolean(v));
}

export async function listPlans(db: Database, q: PlanListQuery, now: Date, memberId?: string): Promise<Page<CarbonationPlanView>> {
  return pageOfViews(await planPage(db, q, now, memberId), (ids) => planViews(db, ids), q);
}

export { planMemberId } from './carbonation.repository.ts';
