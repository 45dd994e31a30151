import { shelfLifeSettingsSchema, type ShelfLifeSettings } from '../../../../shared/cellar/trace.ts';
import { TextField } from '@/components/form/bound-fields';
import { NumberField } from '@/components/form/number-field';
import { SettingFormFrame, SettingRows, settingSection, type SettingFormProps } from '@/features/settings/components/setting-section';
import { useSettingForm } from '@/features/settings/hooks/use-setting-form';

const ShelfLifeSettingsForm = ({ value, canEdit }: SettingFormProps<ShelfLifeSettings>) => {
  const setting = useSettingForm<ShelfLifeSettings>('shelf_life', shelfLifeSettingsSchema, value, {
    savedText: 'Shelf life saved. Kegs filled from now on get best-before dates from it; kegs already filled keep theirs.',
    fields: ['defaultDays', 'nearDays'],
  });
  const { form } = setting;
  return (
    <SettingFormFrame setting={setting} label="Shelf life" canEdit={canEdit} submitLabel="Save the shelf life">
      <fieldset disabled={!canEdit} className="flex flex-col gap-4">
        <div className="grid gap-4 sm:grid-cols-2 lg:grid-cols-4">
          <NumberField
            form={form}
            name="defaultDays"
            label="Shelf life (days)"
            hint="Common practice for unpasteurised draught beer kept cold: 60."
            inputMode="numeric"
          />
          <NumberField
            form={form}
            name="nearDays"
            label="Warn this many days before"
            hint="Kegs this close to best-before show on Today. Default 7."
            inputMode="numeric"
          />
        </div>
        <div className="flex flex-col gap-2">
          <p className="text-sm font-medium">By style (the first whose name appears in a batch’s style applies; a batch may set its own)</p>
          <SettingRows form={form} name="byStyle" canEdit={canEdit} newRow={() => ({ style: '', days: value.defaultDays })} addLabel="Add a style">
            {({ index, field, remove }) => (
              <div key={field.id} className="flex flex-wrap items-end gap-2">
                <TextField form={form} name={`byStyle.${index}.style`} label="Style" inputClassName="w-56" />
                <NumberField form={form} name={`byStyle.${index}.days`} label="Days" inputMode="numeric" inputClassName="w-24" />
                {remove}
              </div>
            )}
          </SettingRows>
        </div>
      </fieldset>
    </SettingFormFrame>
  );
};

/** Settings → Shelf life: the co-op's default, per-style figures and how many days ahead Today warns. */
export const ShelfLifeSettingsSection = settingSection('shelf_life', 'the shelf-life settings', ShelfLifeSettingsForm);
