import { describe, expect, it } from 'vitest';
import { createEquipmentSchema, type CreateEquipmentInput, type Equipment } from '../../../../shared/schemas/equipment.ts';
import { equipmentResolver, formatAttribute, formValuesOf, toApiValues, type EquipmentFormValues } from '../equipment-form.ts';

const tap: Equipment = {
  id: '00000000-0000-4000-8000-000000000001',
  code: 'T-3',
  kind: 'tap',
  name: 'Tap 3',
  capacityLiters: null,
  state: 'ready',
  attributes: { position: 'Cold room, left wall, 3', lineLengthM: 3, lineInsideDiameterMm: 4.8, riseM: 0.5 },
  notes: '',
  stateChangedAt: '2026-11-01T10:00:00Z',
  createdAt: '2026-11-01T10:00:00Z',
  updatedAt: '2026-11-01T10:00:00Z',
};

const resolverOptions = { fields: {}, shouldUseNativeValidation: false } as never;

describe('equipment form values and the API', () => {
  it('shows a tap line in feet and inches for US units and keeps untouched numbers exact', () => {
    const values = formValuesOf(tap, 'us');
    // 3 m ÷ 0.3048 m/ft = 9.8425 ft; 4.8 mm ÷ 25.4 mm/in = 0.189 in (four places).
    expect(values.attributes).toMatchObject({ lineLengthM: 9.8425, lineInsideDiameterMm: 0.189, riseM: 1.6404, coldRoomTempC: null });
    const back = toApiValues(values, 'us', tap);
    expect(back.attributes).toEqual(tap.attributes);
    expect(back).not.toHaveProperty('capacityLiters');
  });

  it('converts what was typed back to metres, millimetres and litres', () => {
    const values: EquipmentFormValues = {
      kind: 'fermenter',
      code: 'f-13',
      name: 'Conical 13',
      capacityLiters: 15.85, // gal
      notes: '',
      attributes: { style: 'conical', hasValve: true, serial: 'left over from another kind' },
    };
    const api = toApiValues(values, 'us');
    expect(api.capacityLiters).toBeCloseTo(60, 1); // 15.85 gal × 3.785 L/gal
    // Only the kind's own attributes travel.
    expect(api.attributes).toEqual({ style: 'conical', hasValve: true });
  });

  it("shows a keg's rated pressure in psi or bar and sends kPa", () => {
    const keg: Equipment = { ...tap, kind: 'keg', code: 'K-001', capacityLiters: 19, attributes: { serial: 'S-1', lock: 'ball', ratedPressureKpa: 896 } };
    // 896 kPa ÷ 6.894757 kPa/psi = 129.9538 psi; 896 kPa ÷ 100 kPa/bar = 8.96 bar.
    expect(formValuesOf(keg, 'us').attributes.ratedPressureKpa).toBe(129.9538);
    expect(formValuesOf(keg, 'metric').attributes.ratedPressureKpa).toBe(8.96);
    const typed = formValuesOf(keg, 'us');
    typed.attributes.ratedPressureKpa = 130;
    expect(toApiValues(typed, 'us', keg).attributes.ratedPressureKpa).toBeCloseTo(896.318, 3); // 130 psi × 6.894757
    expect(toApiValues(formValuesOf(keg, 'metric'), 'metric', keg).attributes).toEqual(keg.attributes);
  });

  it("validates with the shared schema and puts its errors on the form's fields", async () => {
    const resolver = equipmentResolver<CreateEquipmentInput>(createEquipmentSchema, 'metric');
    const bad = await resolver(
      {
        kind: 'tap',
        code: 'tap nine',
        name: 'Tap 9',
        capacityLiters: null,
        notes: '',
        attributes: { position: '', lineLengthM: null, lineInsideDiameterMm: 4.8 },
      },
      undefined,
      resolverOptions,
    );
    expect(bad.errors.code?.message).toBe('Use a code like F-07 or K-031');
    expect(bad.errors.attributes).toMatchObject({ position: { message: 'Enter the position' }, lineLengthM: { message: 'Enter a number' } });

    const good = await resolver(
      {
        kind: 'co2_cylinder',
        code: 'c-7',
        name: 'CO2 cylinder 7',
        capacityLiters: 12,
        notes: '',
        attributes: { sizeKg: 6, fillPercent: 100, hydroTestDue: '2030-05-31' },
      },
      undefined,
      resolverOptions,
    );
    expect(good.errors).toEqual({});
    expect(good.values).toEqual({
      kind: 'co2_cylinder',
      code: 'C-7',
      name: 'CO2 cylinder 7',
      notes: '',
      attributes: { sizeKg: 6, fillPercent: 100, hydroTestDue: '2030-05-31' },
    });
  });

  it("formats stored attributes for the item page in the person's units", () => {
    expect(formatAttribute('tap', 'lineLengthM', 3.048, 'us')).toBe('10 ft');
    expect(formatAttribute('co2_cylinder', 'sizeKg', 6, 'metric')).toBe('6 kg');
    expect(formatAttribute('fermenter', 'hasValve', false, 'metric')).toBe('No');
    expect(formatAttribute('keg', 'lock', 'pin', 'metric')).toBe('Pin lock');
  });
});
