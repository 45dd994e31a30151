import { sgToPlato } from '../../../../shared/brewing/index.ts';

/** Specific gravity as brewers write it: 1.048. */
export function formatSg(sg: number | null | undefined, digits = 3): string {
  return typeof sg === 'number' && Number.isFinite(sg) ? sg.toFixed(digits) : '—';
}

/** The same gravity in degrees Plato (F2.1), for people who think in °P. */
export function formatPlato(sg: number | null | undefined): string {
  if (typeof sg !== 'number' || !Number.isFinite(sg)) return '—';
  try {
    return `${sgToPlato(sg).toFixed(1)} °P`;
  } catch {
    return '—';
  }
}

export function formatPercent(value: number | null | undefined, digits = 1): string {
  return typeof value === 'number' && Number.isFinite(value) ? `${value.toFixed(digits)} %` : '—';
}
