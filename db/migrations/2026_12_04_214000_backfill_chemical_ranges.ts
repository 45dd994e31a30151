import { type Kysely, sql } from 'kysely';

/**
 * Chemicals saved in the co-op's sanitation settings before working ranges existed get one, so the
 * stored list still validates instead of silently falling back to the defaults. A chemical of the
 * shipped list takes its shipped range; any other gets half to twice its usual strength (wide, so
 * no recorded practice is refused overnight; the admin narrows it in Settings). A name that says
 * caustic or hydroxide is marked caustic.
 */
const shipped: Record<string, { min: number; max: number; caustic: boolean }> = {
  'alkaline-cleaner': { min: 0.75, max: 3, caustic: false },
  'caustic-cleaner': { min: 1, max: 3, caustic: true },
  'acid-sanitizer': { min: 1.2, max: 2, caustic: false },
  'peracetic-sanitizer': { min: 100, max: 200, caustic: false },
};

export async function up(db: Kysely<any>): Promise<void> {
  const row = await db.selectFrom('setting').select('value').where('key', '=', 'sanitation').executeTakeFirst();
  const value = row?.value as { chemicals?: Record<string, unknown>[] } | undefined;
  if (!value || !Array.isArray(value.chemicals)) return;
  let changed = false;
  const chemicals = value.chemicals.map((c) => {
    if (typeof c.minConcentration === 'number' && typeof c.maxConcentration === 'number') return c;
    changed = true;
    const usual = typeof c.defaultConcentration === 'number' ? c.defaultConcentration : 1;
    const known = typeof c.id === 'string' ? shipped[c.id] : undefined;
    const min = Math.min(known?.min ?? usual / 2, usual);
    const max = Math.max(known?.max ?? usual * 2, usual);
    const caustic = known?.caustic ?? /caustic|hydroxide/i.test(typeof c.name === 'string' ? c.name : '');
    return { ...c, minConcentration: min, maxConcentration: max, caustic: c.caustic ?? caustic };
  });
  if (!changed) return;
  await db
    .updateTable('setting')
    .set({ value: sql`${JSON.stringify({ ...value, chemicals })}::jsonb` })
    .where('key', '=', 'sanitation')
    .execute();
}

export async function down(): Promise<void> {
  // The ranges stay: older code ignores fields it does not know.
}
