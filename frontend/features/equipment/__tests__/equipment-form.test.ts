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
  it('starts the edit form from the stored values, so an untouched form sends them back exactly', () => {
    const values = formValuesOf(tap);
    // The boxes show these in the person's units; the form holds metres and millimetres.
    expect(values.attributes).toMatchObject({ lineLengthM: 3, lineInsideDiameterMm: 4.8, riseM: 0.5, coldRoomTempC: null });
    const back = toApiValues(values);
    expect(back.attributes).toEqual(tap.attributes);
    expect(back).not.toHaveProperty('capacityLiters');
  });

  it("sends only the kind's own attributes and leaves empty number boxes out", () => {
    const values: EquipmentFormValues = {
      kind: 'fermenter',
      code: 'f-13',
      name: 'Conical 13',
      capacityLiters: 60,
      notes: '',
      attributes: { style: 'conical', hasValve: true, serial: 'left over from another kind' },
    };
    const api = toApiValues(values);
    expect(api.capacityLiters).toBe(60);
    expect(api.attributes).toEqual({ style: 'conical', hasValve: true });
    const keg: Equipment = { ...tap, kind: 'keg', code: 'K-001', capacityLiters: 19, attributes: { serial: 'S-1', lock: 'ball', ratedPressureKpa: null } };
    expect(toApiValues({ ...formValuesOf(keg), capacityLiters: null }).attributes).toEqual({ serial: 'S-1', lock: 'ball' });
    expect(toApiValues({ ...formValuesOf(keg), capacityLiters: null })).not.toHaveProperty('capacityLiters');
  });

  it("validates with the shared schema and puts its errors on the form's fields", async () => {
    const resolver = equipmentResolver<CreateEquipmentInput>(createEquipmentSchema);
    const bad = await resolver(
      {
        kind: 'tap',
        code: 'tap nine',
        name: 'Tap 9',
        capacityLiters: null,
        notes: '',
        attributes: { position: '', lineLengthM: null, lineInsideDiameterMm: Number.NaN },
      },
      undefined,
      resolverOptions,
    );
    expect(bad.errors.code?.message).toBe('Use a code like F-07 or K-031');
    expect(bad.errors.attributes).toMatchObject({ position: { message: 'Enter the position' }, lineLengthM: { message: 'Enter a number' } });
    // Text that is not a number yet ("4," is fine, "4,8," is not) reads the same.
    expect(bad.errors.attributes).toMatchObject({ lineInsideDiameterMm: { message: 'Enter a number' } });

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
