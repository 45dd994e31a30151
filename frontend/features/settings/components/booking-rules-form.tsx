import { equipmentKindLabels, equipmentKinds } from '../../../../shared/schemas/equipment.ts';
import { bookingRulesSchema, type BookingRules } from '../../../../shared/schemas/settings.ts';
import { NumberField } from '@/components/form/number-field';
import { InputField } from '@/components/ui/field';
import { SettingFormFrame, settingSection, type SettingFormProps } from '@/features/settings/components/setting-section';
import { useSettingForm } from '@/features/settings/hooks/use-setting-form';

const wholeDays = { type: 'number', min: 1, step: 1 } as const;

const BookingRulesForm = ({ value, canEdit }: SettingFormProps<BookingRules>) => {
  const setting = useSettingForm<BookingRules>('booking_rules', bookingRulesSchema, value, {
    savedText: 'Booking rules saved. New bookings follow them from now on.',
    fields: ['cleaningBufferHours', 'maxDays', 'maxAdvanceDays', 'maxActiveBookingsPerMember', 'timeZone'],
  });
  const { form } = setting;
  return (
    <SettingFormFrame
      setting={setting}
      label="Booking rules"
      canEdit={canEdit}
      submitLabel="Save booking rules"
      readOnlyNote={<p className="text-xs text-ink-muted">Only the admin changes these rules.</p>}
    >
      <fieldset disabled={!canEdit} className="grid gap-4 sm:grid-cols-2 lg:grid-cols-4">
        <NumberField form={form} name="cleaningBufferHours" label="Cleaning buffer (hours)" hint="Kept free after every booking." {...wholeDays} min={0} />
        <NumberField form={form} name="maxAdvanceDays" label="How far ahead (days)" hint="Latest start of a new booking." {...wholeDays} />
        <NumberField form={form} name="maxActiveBookingsPerMember" label="Bookings at once per member" hint="Booked or in use, not yet ended." {...wholeDays} />
        <InputField
          label="Time zone"
          hint="For e-mails and the calendar's days."
          error={form.formState.errors.timeZone?.message}
          {...form.register('timeZone')}
          autoComplete="off"
        />
      </fieldset>
      <fieldset disabled={!canEdit} className="flex flex-col gap-2">
        <legend className="mb-1 text-sm font-medium">Longest booking (days)</legend>
        <div className="grid gap-4 sm:grid-cols-2 lg:grid-cols-4">
          {equipmentKinds.map((kind) => (
            <NumberField key={kind} form={form} name={`maxDays.${kind}`} label={equipmentKindLabels[kind]} {...wholeDays} />
          ))}
        </div>
      </fieldset>
    </SettingFormFrame>
  );
};

/** The Settings section for the co-op's booking rules (admin edits; the rota and treasurer read). */
export const BookingRulesSection = settingSection('booking_rules', 'the booking rules', BookingRulesForm);
