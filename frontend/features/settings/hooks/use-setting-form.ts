import type { FieldValues, Path } from 'react-hook-form';
import type { z } from 'zod';
import type { SettingKey } from '../../../../shared/schemas/settings.ts';
import { useApiForm, type FormMessage } from '@/components/form/use-api-form';
import { useSaveSetting } from '@/features/settings/api/setting';

export type SettingFormMessage = FormMessage;

/**
 * One Settings section's form, built on the form kit's `useApiForm`: the section's shared schema,
 * saved with PUT; the saved value becomes the form's new start, problems land on `fields` and anything
 * else is the form's error message. "Saved" speaks only of what was saved: it goes as soon as a field
 * changes or a save is tried again, so it never stands beside a validation error.
 */
export function useSettingForm<T extends FieldValues>(
  key: SettingKey,
  schema: z.ZodType<T>,
  value: T,
  { savedText, fields }: { savedText: string; fields: readonly Path<T>[] },
) {
  const save = useSaveSetting<T>(key);
  const { form, message, setMessage, showProblem, submit } = useApiForm<T>(schema, {
    defaultValues: value as never,
    fields,
    clearMessageOnChange: true,
  });
  const onSubmit = submit(async (values) => {
    try {
      const saved = await save.mutateAsync(values);
      form.reset(saved.value);
      setMessage({ tone: 'success', text: savedText });
    } catch (error) {
      showProblem(error);
    }
  });
  return { form, save, message, onSubmit };
}
