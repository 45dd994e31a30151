/**
 * What the treasurer types as money ("12.50", "12,50", "€ 1,234.5", "-5") to integer cents, or NaN
 * when it is not an amount (the shared schema then says so next to the field).
 */
export function parseMoneyInput(text: unknown): number {
  if (typeof text === 'number') return Number.isFinite(text) ? Math.round(text * 100) : Number.NaN;
  if (typeof text !== 'string') return Number.NaN;
  let s = text
    .trim()
    .replace(/[\s€$£]/g, '')
    .replace(/^[A-Z]{3}/i, '');
  if (!s) return Number.NaN;
  const negative = s.startsWith('-') || s.startsWith('−');
  s = s.replace(/^[-−+]/, '');
  // "1,234.50" and "1.234,50" group thousands; a lone "." or "," with one or two digits after it is the decimal point.
  let whole: string;
  let fraction = '';
  const dot = s.lastIndexOf('.');
  const comma = s.lastIndexOf(',');
  if (dot >= 0 && comma >= 0) {
    const decimal = dot > comma ? '.' : ',';
    const group = decimal === '.' ? ',' : '.';
    const [w, f, extra] = s.split(decimal);
    if (extra !== undefined || !f || !/^\d{1,2}$/.test(f) || !new RegExp(`^\\d{1,3}(\\${group}\\d{3})*$`).test(w!)) return Number.NaN;
    whole = w!.split(group).join('');
    fraction = f;
  } else if (dot >= 0 || comma >= 0) {
    const [w, f, extra] = s.split(dot >= 0 ? '.' : ',');
    if (extra !== undefined || !f || !/^\d{1,2}$/.test(f) || !/^\d+$/.test(w!)) return Number.NaN;
    whole = w!;
    fraction = f;
  } else {
    if (!/^\d+$/.test(s)) return Number.NaN;
    whole = s;
  }
  const cents = Number(whole) * 100 + Number(fraction.padEnd(2, '0') || '0');
  return negative ? -cents : cents;
}

export function centsToInput(cents: number): string {
  return (cents / 100).toFixed(2);
}
