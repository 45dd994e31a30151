import { useMemo } from 'react';
import { useSessionUser } from '@/lib/auth';
import { unitFormatter, type UnitFormatter } from '@/lib/units';

/** Format helpers in the signed-in person's units (metric until they say otherwise). */
export function useUnits(): UnitFormatter {
  const units = useSessionUser()?.units ?? 'metric';
  return useMemo(() => unitFormatter(units), [units]);
}
