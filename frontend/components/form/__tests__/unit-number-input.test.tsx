// @vitest-environment happy-dom
import { act, cleanup, fireEvent, screen, waitFor } from '@testing-library/react';
import { useForm } from 'react-hook-form';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { celsiusToFahrenheit, usGallonsToLiters } from '../../../../shared/brewing/index.ts';
import { renderSignedIn } from './render.tsx';
import { parseDecimal } from '@/components/form/decimal';
import { apiValueOf, displayText, UnitNumberField, UnitNumberInput } from '@/components/form/unit-number-input';

afterEach(cleanup);

describe('parseDecimal', () => {
  it('reads a decimal comma or point, and an empty box as nothing', () => {
    expect(parseDecimal('4,5')).toBe(4.5);
    expect(parseDecimal(' 4.5 ')).toBe(4.5);
    expect(parseDecimal('-0,25')).toBe(-0.25);
    expect(parseDecimal(',5')).toBe(0.5);
    expect(parseDecimal('12,')).toBe(12);
    expect(parseDecimal('')).toBeNull();
  });

  it('calls half-typed or mistyped text NaN', () => {
    for (const text of ['-', '.', '1,2,3', '1.2.3', '4,5 L', 'abc', '1e3']) expect(parseDecimal(text)).toBeNaN();
  });
});

describe('apiValueOf and displayText', () => {
  it('converts US units to the API unit through shared/brewing', () => {
    expect(apiValueOf('5', 'volume', 'us')).toBe(usGallonsToLiters(5));
    expect(apiValueOf('5,5', 'volume', 'us', 2)).toBe(20.82); // 5.5 gal × 3.785411784 L/gal = 20.8198 L
    expect(apiValueOf('38', 'temperature', 'us')).toBeCloseTo(3.3333333, 6); // (38 − 32) / 1.8
    expect(apiValueOf('12', 'pressure', 'metric')).toBe(1200); // bar → kPa
    expect(apiValueOf('12', 'pressure', 'us')).toBeCloseTo(82.737, 3); // 12 psi × 6.894757 kPa/psi
    expect(apiValueOf('19,5', 'volume', 'metric')).toBe(19.5);
  });

  it('keeps a value the shared conversions refuse as NaN, not as a wrong number', () => {
    expect(apiValueOf('-500', 'temperature', 'us')).toBeNaN(); // below absolute zero (−459.67 °F)
    expect(apiValueOf('-', 'volume', 'us')).toBeNaN();
    expect(apiValueOf('', 'volume', 'us')).toBeNull();
  });

  it('shows an API value in the person’s units without trailing zeros', () => {
    expect(displayText(3, 'temperature', 'us')).toBe(String(Number(celsiusToFahrenheit(3).toFixed(1)))); // 37.4
    expect(displayText(18.927, 'volume', 'us')).toBe('5'); // 18.927 L ÷ 3.785411784 = 5.0000 gal
    expect(displayText(83, 'pressure', 'metric')).toBe('0.83');
    expect(displayText(null, 'volume', 'metric')).toBe('');
    expect(displayText(1.0123, { label: 'SG' }, 'metric')).toBe('1.0123');
  });
});

describe('UnitNumberInput', () => {
  it('shows the person’s unit and hands on the API value as they type, with a decimal comma', () => {
    const seen: (number | null)[] = [];
    renderSignedIn(<UnitNumberInput aria-label="Volume" kind="volume" value={null} onValueChange={(v) => seen.push(v)} />, 'us');
    expect(screen.getByText('gal')).toBeTruthy();
    const box = screen.getByLabelText<HTMLInputElement>('Volume');
    fireEvent.change(box, { target: { value: '2,5' } });
    expect(box.value).toBe('2,5');
    expect(seen.at(-1)).toBe(usGallonsToLiters(2.5));
  });

  it('keeps half-typed text as typed and converts once it parses', () => {
    const seen: (number | null)[] = [];
    renderSignedIn(<UnitNumberInput aria-label="Temperature" kind="temperature" value={null} onValueChange={(v) => seen.push(v)} />, 'us');
    const box = screen.getByLabelText<HTMLInputElement>('Temperature');
    fireEvent.change(box, { target: { value: '-' } });
    expect(box.value).toBe('-');
    expect(seen.at(-1)).toBeNaN();
    fireEvent.change(box, { target: { value: '-4' } });
    expect(box.value).toBe('-4');
    expect(seen.at(-1)).toBeCloseTo(-20, 9); // −4 °F = −20 °C
    fireEvent.change(box, { target: { value: '' } });
    expect(seen.at(-1)).toBeNull();
  });

  it('shows metric units to a person who prefers them', () => {
    renderSignedIn(<UnitNumberInput aria-label="Pressure" kind="pressure" value={83} onValueChange={() => undefined} />, 'metric');
    expect(screen.getByText('bar')).toBeTruthy();
    expect(screen.getByLabelText<HTMLInputElement>('Pressure').value).toBe('0.83');
  });
});

describe('UnitNumberField', () => {
  it('gives react-hook-form the API unit and shows a value reset from outside', async () => {
    const submitted = vi.fn();
    let reset: (litres: number) => void = () => undefined;
    const Form = () => {
      const form = useForm<{ volumeLiters: number | null }>({ defaultValues: { volumeLiters: 18.927 } });
      reset = (litres) => form.reset({ volumeLiters: litres });
      return (
        <form onSubmit={form.handleSubmit((values) => submitted(values))}>
          <UnitNumberField control={form.control} name="volumeLiters" kind="volume" label="Volume" apiDigits={2} />
          <button type="submit">Save</button>
        </form>
      );
    };
    renderSignedIn(<Form />, 'us');
    const box = screen.getByLabelText<HTMLInputElement>('Volume');
    expect(box.value).toBe('5');
    fireEvent.change(box, { target: { value: '10,5' } });
    fireEvent.click(screen.getByText('Save'));
    await waitFor(() => expect(submitted).toHaveBeenCalledWith({ volumeLiters: 39.75 })); // 10.5 gal × 3.785411784 = 39.7468 L
    act(() => reset(37.854));
    await waitFor(() => expect(box.value).toBe('10')); // 37.854 L ≈ 10.0000 gal
  });
});
