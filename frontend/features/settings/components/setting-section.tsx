import type { ComponentType, FormEventHandler, ReactNode } from 'react';
import { useFieldArray, type ArrayPath, type FieldArray, type FieldArrayWithId, type FieldValues } from 'react-hook-form';
import type { AnyForm } from '@/components/form/bound-fields';
import type { SettingKey } from '../../../../shared/schemas/settings.ts';
import { FormFrame } from '@/components/form/form-frame';
import { Button } from '@/components/ui/button';
import type { FormMessage } from '@/components/form/use-api-form';
import { SettingLoader } from '@/features/settings/components/setting-loader';

/** What a section's form is given: the saved value, and whether this person may change it. */
export interface SettingFormProps<T> {
  value: T;
  canEdit: boolean;
}

/** A Settings section: loads the setting `settingKey` ("Loading `what`") and shows `Form` with its saved value. */
export function settingSection<T>(settingKey: SettingKey, what: string, Form: ComponentType<SettingFormProps<T>>) {
  const Section = ({ canEdit }: { canEdit: boolean }) => (
    <SettingLoader<T> settingKey={settingKey} what={what}>
      {(value) => <Form value={value} canEdit={canEdit} />}
    </SettingLoader>
  );
  return Section;
}

export interface SettingFormFrameProps {
  /** What `useSettingForm` returned. */
  setting: { onSubmit: FormEventHandler<HTMLFormElement>; message: FormMessage | null; save: { isPending: boolean } };
  /** The form's accessible name: "Booking rules". */
  label: string;
  canEdit: boolean;
  submitLabel: string;
  /** Said instead of the button to whoever may only read. */
  readOnlyNote?: ReactNode;
  children: ReactNode;
}

/** A Settings section's form: its message, the fields, and "Save …" for whoever may edit. */
export const SettingFormFrame = ({ setting, label, canEdit, submitLabel, readOnlyNote, children }: SettingFormFrameProps) => (
  <FormFrame
    onSubmit={setting.onSubmit}
    message={setting.message}
    pending={setting.save.isPending}
    submitLabel={canEdit ? submitLabel : undefined}
    readOnlyNote={readOnlyNote}
    actions="start"
    aria-label={label}
  >
    {children}
  </FormFrame>
);

export interface ListRowButtonProps {
  canEdit: boolean;
  onClick: () => void;
  size?: 'sm' | 'md';
}

/** A section's list (styles, chemicals, style families): "Remove" on a row, for whoever may edit. */
export const RemoveRowButton = ({ canEdit, onClick, size, label }: ListRowButtonProps & { label?: string }) =>
  canEdit ? (
    <Button variant="ghost" size={size} onClick={onClick} aria-label={label}>
      Remove
    </Button>
  ) : null;

/** "Add a …" under a section's list, for whoever may edit. */
export const AddRowButton = ({ canEdit, onClick, size, children }: ListRowButtonProps & { children: ReactNode }) =>
  canEdit ? (
    <div>
      <Button variant="secondary" size={size} onClick={onClick}>
        {children}
      </Button>
    </div>
  ) : null;

export interface SettingRowsProps<T extends FieldValues, N extends ArrayPath<T>> {
  form: AnyForm<T>;
  /** The list field: `byStyle`, `chemicals`, `stylePresets`. */
  name: N;
  canEdit: boolean;
  /** The row "Add" appends, given how many there are. */
  newRow: (count: number) => FieldArray<T, N>;
  addLabel: ReactNode;
  /** The Remove button's accessible name for a row, where "Remove" alone would not say which. */
  removeLabel?: (field: FieldArrayWithId<T, N>) => string;
  size?: 'sm' | 'md';
  /**
   * One row's fields: `index` names them (`byStyle.${index}.days`), `remove` is its Remove button to
   * place among them.
   */
  children: (row: { index: number; field: FieldArrayWithId<T, N>; remove: ReactNode }) => ReactNode;
}

/** A section's list of rows (styles, chemicals, style families) with Remove on each and Add under them, for whoever may edit. */
export const SettingRows = <T extends FieldValues, N extends ArrayPath<T>>({
  form,
  name,
  canEdit,
  newRow,
  addLabel,
  removeLabel,
  size,
  children,
}: SettingRowsProps<T, N>) => {
  const rows = useFieldArray<T, N>({ control: form.control, name });
  return (
    <>
      {rows.fields.map((field, index) =>
        children({ index, field, remove: <RemoveRowButton canEdit={canEdit} size={size} onClick={() => rows.remove(index)} label={removeLabel?.(field)} /> }),
      )}
      <AddRowButton canEdit={canEdit} size={size} onClick={() => rows.append(newRow(rows.fields.length))}>
        {addLabel}
      </AddRowButton>
    </>
  );
};
