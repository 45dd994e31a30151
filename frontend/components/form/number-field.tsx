import type { ComponentProps } from 'react';
import type { FieldValues, Path } from 'react-hook-form';
import { fieldError, type AnyForm } from '@/components/form/bound-fields';
import { asNullableNumber, asNumber, asOptionalNumber } from '@/components/form/decimal';
import { InputField } from '@/components/ui/field';

/** What an empty box is: refused by the schema (NaN), left out (`undefined`) or "not given" (`null`). */
export type EmptyNumber = 'refuse' | 'omit' | 'null';

const readers = { refuse: asNumber, omit: asOptionalNumber, null: asNullableNumber } as const;

export interface NumberFieldProps<T extends FieldValues> extends Omit<ComponentProps<typeof InputField>, 'error' | 'name' | 'label' | 'form'> {
  form: AnyForm<T>;
  name: Path<T>;
  label: ComponentProps<typeof InputField>['label'];
  empty?: EmptyNumber;
}

/**
 * A labelled number box registered on a react-hook-form field, read through the kit's one decimal reader
 * (a decimal comma is taken), with the field's error beside it. For a quantity in the person's units use
 * `UnitNumberField`.
 */
export const NumberField = <T extends FieldValues>({ form, name, empty = 'refuse', ...input }: NumberFieldProps<T>) => (
  <InputField {...input} error={fieldError(form, name)} {...form.register(name, readers[empty])} />
);
