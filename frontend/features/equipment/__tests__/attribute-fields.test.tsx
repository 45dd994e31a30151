// @vitest-environment happy-dom
import { cleanup, fireEvent, screen } from '@testing-library/react';
import { useForm } from 'react-hook-form';
import { afterEach, describe, expect, it } from 'vitest';
import type { Equipment } from '../../../../shared/schemas/equipment.ts';
import { renderSignedIn } from '../../../components/form/__tests__/render.tsx';
import { EquipmentRegistryFields } from '@/features/equipment/components/attribute-fields';
import { formValuesOf, toApiValues, type EquipmentFormValues } from '@/features/equipment/equipment-form';
import type { UnitSystem } from '@/lib/units';

afterEach(cleanup);

const keg: Equipment = {
  id: '00000000-0000-4000-8000-000000000002',
  code: 'K-001',
  kind: 'keg',
  name: '19 L ball lock keg',
  capacityLiters: 19,
  state: 'ready',
  attributes: { serial: 'S-1', lock: 'ball', ratedPressureKpa: 896 },
  notes: '',
  stateChangedAt: '2026-11-01T10:00:00Z',
  createdAt: '2026-11-01T10:00:00Z',
  updatedAt: '2026-11-01T10:00:00Z',
};

/** The keg's fields in an edit form; `sent` reads what the form would send. */
function renderKeg(units: UnitSystem) {
  const seen: { values?: () => EquipmentFormValues } = {};
  const Form = () => {
    const form = useForm<EquipmentFormValues>({ defaultValues: formValuesOf(keg) });
    seen.values = () => form.getValues();
    return <EquipmentRegistryFields kind="keg" form={form} units={units} />;
  };
  renderSignedIn(<Form />, units);
  return { sent: () => toApiValues(seen.values!()) };
}

const suffixOf = (box: HTMLElement) => box.parentElement?.querySelector('[data-unit]')?.textContent;

describe("the equipment form's number boxes", () => {
  it("show a keg's volume and rated pressure in US units with the unit beside the number", () => {
    const { sent } = renderKeg('us');
    const pressure = screen.getByLabelText('Rated working pressure (psi)');
    // 896 kPa ÷ 6.894757 kPa/psi = 129.95 psi, shown to one place; 19 L ÷ 3.785411784 L/gal = 5.02 gal.
    expect(pressure).toHaveProperty('value', '130');
    expect(suffixOf(pressure)).toBe('psi');
    expect(screen.getByLabelText('Capacity (gal)')).toHaveProperty('value', '5.02');
    // Untouched, the stored numbers travel back exactly.
    expect(sent()).toMatchObject({ capacityLiters: 19, attributes: { ratedPressureKpa: 896 } });
  });

  it('take a decimal comma in metric units and hold the API value', () => {
    const { sent } = renderKeg('metric');
    const pressure = screen.getByLabelText('Rated working pressure (bar)');
    expect(pressure).toHaveProperty('value', '8.96');
    fireEvent.change(pressure, { target: { value: '8,5' } });
    fireEvent.change(screen.getByLabelText('Capacity (L)'), { target: { value: '18,9' } });
    expect(sent()).toMatchObject({ capacityLiters: 18.9, attributes: { ratedPressureKpa: 850 } }); // 8.5 bar × 100 kPa/bar
    fireEvent.change(pressure, { target: { value: '' } });
    expect(sent().attributes).not.toHaveProperty('ratedPressureKpa');
  });
});
