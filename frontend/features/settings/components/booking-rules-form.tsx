import { equipmentKindLabels, equipmentKinds } from '../../../../shared/schemas/equipment.ts';
import { bookingRulesSchema, type BookingRules } from '../../../../shared/schemas/settings.ts';
import { Alert } from '@/components/ui/alert';
import { Button } from '@/components/ui/button';
import { Field } from '@/components/ui/field';
import { Input } from '@/components/ui/input';
import { SettingLoader } from '@/features/settings/components/setting-loader';
import { useSettingForm } from '@/features/settings/hooks/use-setting-form';
import { asNumber } from '@/components/form/decimal';

/** The Settings section for the co-op's booking rules (admin edits; the rota and treasurer read). */
export const BookingRulesSection = ({ canEdit }: { canEdit: boolean }) => (
  <SettingLoader<BookingRules> settingKey="booking_rules" what="the booking rules">
    {(value) => <BookingRulesForm value={value} canEdit={canEdit} />}
  </SettingLoader>
);

const BookingRulesForm = ({ value, canEdit }: { value: BookingRules; canEdit: boolean }) => {
  const { form, save, message, onSubmit } = useSettingForm<BookingRules>('booking_rules', bookingRulesSchema, value, {
    savedText: 'Booking rules saved. New bookings follow them from now on.',
    fields: ['cleaningBufferHours', 'maxDays', 'maxAdvanceDays', 'maxActiveBookingsPerMember', 'timeZone'],
  });
  const errors = form.formState.errors;
  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4" aria-label="Booking rules">
      {message ? <Alert tone={message.tone}>{message.text}</Alert> : null}
      <fieldset disabled={!canEdit} className="grid gap-4 sm:grid-cols-2 lg:grid-cols-4">
        <Field label="Cleaning buffer (hours)" hint="Kept free after every booking." error={errors.cleaningBufferHours?.message}>
          {(c) => <Input {...c} type="number" min={0} step={1} {...form.register('cleaningBufferHours', asNumber)} />}
        </Field>
        <Field label="How far ahead (days)" hint="Latest start of a new booking." error={errors.maxAdvanceDays?.message}>
          {(c) => <Input {...c} type="number" min={1} step={1} {...form.register('maxAdvanceDays', asNumber)} />}
        </Field>
        <Field label="Bookings at once per member" hint="Booked or in use, not yet ended." error={errors.maxActiveBookingsPerMember?.message}>
          {(c) => <Input {...c} type="number" min={1} step={1} {...form.register('maxActiveBookingsPerMember', asNumber)} />}
        </Field>
        <Field label="Time zone" hint="For e-mails and the calendar's days." error={errors.timeZone?.message}>
          {(c) => <Input {...c} {...form.register('timeZone')} autoComplete="off" />}
        </Field>
      </fieldset>
      <fieldset disabled={!canEdit} className="flex flex-col gap-2">
        <legend className="mb-1 text-sm font-medium">Longest booking (days)</legend>
        <div className="grid gap-4 sm:grid-cols-2 lg:grid-cols-4">
          {equipmentKinds.map((kind) => (
            <Field key={kind} label={equipmentKindLabels[kind]} error={errors.maxDays?.[kind]?.message}>
              {(c) => <Input {...c} type="number" min={1} step={1} {...form.register(`maxDays.${kind}`, asNumber)} />}
            </Field>
          ))}
        </div>
      </fieldset>
      {canEdit ? (
        <div>
          <Button type="submit" pending={save.isPending}>
            Save booking rules
          </Button>
        </div>
      ) : (
        <p className="text-xs text-ink-muted">Only the admin changes these rules.</p>
      )}
    </form>
  );
};
