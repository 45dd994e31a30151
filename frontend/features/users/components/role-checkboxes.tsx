import type { FieldValues, Path } from 'react-hook-form';
import { roleLabels, roles, type Role } from '../../../../shared/permissions/roles.ts';
import { fieldError, type AnyForm } from '@/components/form/bound-fields';
import { FieldSet } from '@/components/ui/field';
import { Checkbox } from '@/components/ui/input';

export const roleDescriptions: Record<Role, string> = {
  member: 'Books fermenters and kegs, keeps the log of their own batches, pays their invoices.',
  brewer_on_duty: 'Runs the cellar: sanitation, transfers, keg check-out and return. Sees no invoice amounts.',
  treasurer: 'Prices, invoices, payments and exports. Reads cellar records without changing them.',
  admin: 'Manages people and roles, the equipment registry and settings. Can do everything.',
};

export interface RoleCheckboxesProps<T extends FieldValues & { roles: Role[] }> {
  /** A form with a `roles` field. */
  form: AnyForm<T>;
  /** Roles that cannot be switched here (e.g. your own admin role). */
  locked?: readonly Role[];
  lockedHint?: string;
}

/** The four roles as a checkbox group; react-hook-form collects the checked values as an array. */
export const RoleCheckboxes = <T extends FieldValues & { roles: Role[] }>({ form, locked = [], lockedHint }: RoleCheckboxesProps<T>) => {
  const name = 'roles' as Path<T>;
  const registration = form.register(name);
  return (
    <FieldSet legend="Roles" hint="A person may hold several." error={fieldError(form, name)}>
      {roles.map((role) => (
        <Checkbox
          key={role}
          value={role}
          label={roleLabels[role]}
          description={locked.includes(role) && lockedHint ? lockedHint : roleDescriptions[role]}
          disabled={locked.includes(role)}
          {...registration}
        />
      ))}
    </FieldSet>
  );
};
