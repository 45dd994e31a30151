/**
 * What the treasurer types as money ("12.50", "12,50", "€ 1,234.5", "-5") to integer cents, or NaN
 * when it is not an amount (the shared schema then says so next to the field).
 */
export function parseMoneyInput(text: unknown): number {
  if (typeof text === 'number') return Number.isFinite(text) ? Math.round(text * 100) : Number.NaN;
  if (typeof text !== 'string') return Number.NaN;
  let s = text.trim().replace(/[\s€$£]/g, '').replace(/^[A-Z]{3}/i, '');
  if (!s) return Number.NaN;
  const negative = s.startsWith('-') || s.startsWith('−');
  s = s.replace(/^[-−+]/, '');
  // "1,234.50" or "1.234,50": the last separator with one or two digits after it is the decimal one.
  const m = /^(\d{1,3}(?:[.,]\d{3})*|\d+)(?:([.,])(\d{1,2}))?$/.exec(s);
  if (!m) return Number.NaN;
  const whole = Number(m[1]!.replace(/[.,]/g, ''));
  const fraction = m[3] ? Number(m[3].padEnd(2, '0')) : 0;
  const cents = whole * 100 + fraction;
  return negative ? -cents : cents;
}

export function centsToInput(cents: number): string {
  return (cents / 100).toFixed(2);
}
