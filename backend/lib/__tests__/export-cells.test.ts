import { describe, expect, it } from 'vitest';
import { csvCell, neutralise, xlsxCell, xlsxDate, xlsxMoneyFormat } from '../export-cells.ts';

describe('export cells', () => {
  it('prefixes text a spreadsheet would run as a formula', () => {
    for (const s of ['=1+2', '+44 fee', '-10% spoilage', '@SUM(A1)', '\t=1', '\r=1', '＝1+1', '＋1', '－1', '＠A1', '-1+2', '+', '-', '=']) {
      expect(neutralise(s)).toBe(`'${s}`);
    }
  });

  it('leaves other text, and text that is just a number, as it is', () => {
    for (const s of ['Pale ale', '', ' =1', "'=1", '-3.5', '+1', '-0.25', '12', '1e3', '-2,5', '2026-11', 'a=b']) {
      expect(neutralise(s)).toBe(s);
    }
  });

  it('keeps numbers, booleans and dates typed, and empty cells empty', () => {
    expect(csvCell(-3.5)).toBe(-3.5);
    expect(csvCell(null)).toBe('');
    expect(csvCell(undefined)).toBe('');
    expect(csvCell(true)).toBe(true);
    expect(csvCell(new Date('2026-12-01T10:00:00Z'))).toBe('2026-12-01T10:00:00.000Z');
    expect(csvCell('=x')).toBe("'=x");
    expect(xlsxCell(-3.5)).toBe(-3.5);
    expect(xlsxCell(null)).toBeNull();
    const d = new Date('2026-12-01T10:00:00Z');
    expect(xlsxCell(d)).toBe(d);
    expect(xlsxCell('@x')).toBe("'@x");
  });

  it('types a day as a date at midnight UTC, and leaves no day empty', () => {
    expect(xlsxDate('2026-12-01')).toEqual(new Date('2026-12-01T00:00:00Z'));
    expect(xlsxDate('2028-02-29')).toEqual(new Date('2028-02-29T00:00:00Z'));
    expect(xlsxDate('2026-09')).toEqual(new Date('2026-09-01T00:00:00Z'));
    expect(xlsxDate(null)).toBeNull();
    expect(xlsxDate('')).toBeNull();
    expect(() => xlsxDate('someday')).toThrow();
  });

  it('formats money with its currency’s symbol, two decimals and grouped thousands', () => {
    expect(xlsxMoneyFormat('EUR')).toBe('"€"#,##0.00;-"€"#,##0.00');
    expect(xlsxMoneyFormat('usd ')).toBe('"$"#,##0.00;-"$"#,##0.00');
    expect(xlsxMoneyFormat('GBP')).toBe('"£"#,##0.00;-"£"#,##0.00');
    expect(xlsxMoneyFormat('CHF')).toBe('"CHF "#,##0.00;-"CHF "#,##0.00');
  });
});
