import type { FieldValues } from 'react-hook-form';
import { TextField, type TextFieldProps } from '@/components/form/bound-fields';
import { parseMoneyInput } from '@/features/billing/utils/money-input';

const asCents = { setValueAs: parseMoneyInput };

/** A money box on a form field held in integer cents: the treasurer types "12.50", "12,50" or "-5". */
export const MoneyField = <T extends FieldValues>(props: Omit<TextFieldProps<T>, 'options' | 'kind' | 'type'>) => (
  <TextField {...props} inputMode="decimal" options={asCents} />
);
