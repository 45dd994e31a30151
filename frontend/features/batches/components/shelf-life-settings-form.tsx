import { useFieldArray } from 'react-hook-form';
import { shelfLifeSettingsSchema, type ShelfLifeSettings } from '../../../../shared/cellar/trace.ts';
import { Alert } from '@/components/ui/alert';
import { Button } from '@/components/ui/button';
import { Field } from '@/components/ui/field';
import { Input } from '@/components/ui/input';
import { SettingLoader } from '@/features/settings/components/setting-loader';
import { useSettingForm } from '@/features/settings/hooks/use-setting-form';
import { asNumber } from '@/components/form/decimal';

/** Settings → Shelf life: the co-op's default, per-style figures and how many days ahead Today warns. */
export const ShelfLifeSettingsSection = ({ canEdit }: { canEdit: boolean }) => (
  <SettingLoader<ShelfLifeSettings> settingKey="shelf_life" what="the shelf-life settings">
    {(value) => <ShelfLifeSettingsForm value={value} canEdit={canEdit} />}
  </SettingLoader>
);

const ShelfLifeSettingsForm = ({ value, canEdit }: { value: ShelfLifeSettings; canEdit: boolean }) => {
  const { form, save, message, onSubmit } = useSettingForm<ShelfLifeSettings>('shelf_life', shelfLifeSettingsSchema, value, {
    savedText: 'Shelf life saved. Kegs filled from now on get best-before dates from it; kegs already filled keep theirs.',
    fields: ['defaultDays', 'nearDays'],
  });
  const styles = useFieldArray({ control: form.control, name: 'byStyle' });
  const errors = form.formState.errors;
  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4" aria-label="Shelf life">
      {message ? <Alert tone={message.tone}>{message.text}</Alert> : null}
      <fieldset disabled={!canEdit} className="flex flex-col gap-4">
        <div className="grid gap-4 sm:grid-cols-2 lg:grid-cols-4">
          <Field label="Shelf life (days)" hint="Common practice for unpasteurised draught beer kept cold: 60." error={errors.defaultDays?.message}>
            {(c) => <Input {...c} inputMode="numeric" {...form.register('defaultDays', asNumber)} />}
          </Field>
          <Field label="Warn this many days before" hint="Kegs this close to best-before show on Today. Default 7." error={errors.nearDays?.message}>
            {(c) => <Input {...c} inputMode="numeric" {...form.register('nearDays', asNumber)} />}
          </Field>
        </div>
        <div className="flex flex-col gap-2">
          <p className="text-sm font-medium">By style (the first whose name appears in a batch’s style applies; a batch may set its own)</p>
          {styles.fields.map((f, i) => (
            <div key={f.id} className="flex flex-wrap items-end gap-2">
              <Field label="Style" error={errors.byStyle?.[i]?.style?.message}>
                {(c) => <Input {...c} className="w-56" {...form.register(`byStyle.${i}.style`)} />}
              </Field>
              <Field label="Days" error={errors.byStyle?.[i]?.days?.message}>
                {(c) => <Input {...c} inputMode="numeric" className="w-24" {...form.register(`byStyle.${i}.days`, asNumber)} />}
              </Field>
              {canEdit ? (
                <Button variant="ghost" onClick={() => styles.remove(i)}>
                  Remove
                </Button>
              ) : null}
            </div>
          ))}
          {canEdit ? (
            <div>
              <Button variant="secondary" onClick={() => styles.append({ style: '', days: value.defaultDays })}>
                Add a style
              </Button>
            </div>
          ) : null}
        </div>
      </fieldset>
      {canEdit ? (
        <div>
          <Button type="submit" pending={save.isPending}>
            Save the shelf life
          </Button>
        </div>
      ) : null}
    </form>
  );
};
