import { useEffect, useMemo, useRef } from 'react';
import { useForm } from 'react-hook-form';
import {
  createEquipmentSchema,
  equipmentKindLabels,
  equipmentKinds,
  equipmentKindSchema,
  type CreateEquipmentInput,
  type Equipment,
} from '../../../../shared/schemas/equipment.ts';
import { OptionList } from '@/components/form/bound-fields';
import { FormFrame } from '@/components/form/form-frame';
import { useActionError } from '@/components/form/use-action-error';
import { SelectField } from '@/components/ui/field';
import { FormDialog } from '@/components/ui/form-dialog';
import { useCreateEquipment, useNextEquipmentCode } from '@/features/equipment/api/create-equipment';
import { EquipmentRegistryFields } from '@/features/equipment/components/attribute-fields';
import { applyEquipmentProblem, defaultAttributes, equipmentResolver, kindHasCapacity, type EquipmentFormValues } from '@/features/equipment/equipment-form';
import { useUnits } from '@/hooks/use-units';

/** The admin adds a fermenter, keg, tap position or CO2 cylinder to the registry. */
export const EquipmentAddDialog = ({ open, onClose, onCreated }: { open: boolean; onClose: () => void; onCreated: (item: Equipment) => void }) => {
  const mutation = useCreateEquipment();
  return (
    <FormDialog
      open={open}
      onClose={onClose}
      title="Add equipment"
      description="Pick the kind first: the code, the fields and the units follow it. New items start as “Needs cleaning”."
    >
      <AddForm
        mutation={mutation}
        onDone={(item) => {
          onCreated(item);
          onClose();
        }}
      />
    </FormDialog>
  );
};

const AddForm = ({ mutation, onDone }: { mutation: ReturnType<typeof useCreateEquipment>; onDone: (item: Equipment) => void }) => {
  const units = useUnits();
  const resolver = useMemo(() => equipmentResolver<CreateEquipmentInput>(createEquipmentSchema), []);
  const { error, run } = useActionError();
  const form = useForm<EquipmentFormValues, unknown, CreateEquipmentInput>({
    resolver,
    defaultValues: { kind: 'fermenter', code: '', name: '', capacityLiters: null, notes: '', attributes: defaultAttributes.fermenter },
  });
  const kind = form.watch('kind');
  const nextCode = useNextEquipmentCode(kind);
  // The suggested code fills the box until the admin types their own.
  const suggested = useRef('');
  useEffect(() => {
    const code = nextCode.data?.kind === kind ? nextCode.data.code : undefined;
    if (!code) return;
    const current = form.getValues('code');
    if (current === '' || current === suggested.current) form.setValue('code', code, { shouldDirty: true });
    suggested.current = code;
  }, [nextCode.data, kind, form]);

  const onSubmit = form.handleSubmit((values) =>
    run(async () => {
      try {
        const { equipment } = await mutation.mutateAsync(values);
        onDone(equipment);
      } catch (problem) {
        return applyEquipmentProblem(problem, form.setError).join(' ');
      }
    }),
  );
  const kindField = form.register('kind');
  return (
    <FormFrame onSubmit={onSubmit} error={error} pending={mutation.isPending} submitLabel="Add to the registry">
      <SelectField
        label="Kind"
        error={form.formState.errors.kind?.message}
        {...kindField}
        onChange={(event) => {
          const next = equipmentKindSchema.safeParse(event.target.value);
          if (!next.success) return;
          void kindField.onChange(event);
          form.setValue('attributes', { ...defaultAttributes[next.data] });
          if (!kindHasCapacity(next.data)) form.setValue('capacityLiters', null);
          form.clearErrors();
        }}
      >
        <OptionList values={equipmentKinds} labels={equipmentKindLabels} />
      </SelectField>
      <EquipmentRegistryFields
        kind={kind}
        form={form}
        units={units.units}
        codeHint={nextCode.data?.kind === kind ? `Next free: ${nextCode.data.code}` : 'Letter, dash, number — as on the label'}
      />
    </FormFrame>
  );
};
