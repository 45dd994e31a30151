import { AbilityProvider, Can as CaslCan, useAbility, type CanProps } from '@casl/react';
import { useMemo, type ReactNode } from 'react';
import { defineAbilityFor, type Action, type AppAbility, type SubjectName } from '../../shared/permissions/ability.ts';
import { useSessionUser } from '@/lib/auth';

/**
 * The client's CASL ability, built from the signed-in person with the same `defineAbilityFor` the
 * server uses. It only decides what is shown; the server checks every request itself.
 */
export function AppAbilityProvider({ children }: { children: ReactNode }) {
  const user = useSessionUser();
  const id = user?.id;
  const rolesKey = user?.roles.join(',') ?? '';
  const ability = useMemo(
    () => defineAbilityFor(id ? { id, roles: user?.roles ?? [] } : null),
    // Rebuild only when the person or their roles change, not on every refetch of /me.
    // eslint-disable-next-line react-hooks/exhaustive-deps -- as above
    [id, rolesKey],
  );
  return <AbilityProvider value={ability}>{children}</AbilityProvider>;
}

export function useAppAbility(): AppAbility {
  return useAbility<AppAbility>();
}

/** `<Can I="read" a="Mailbox">…</Can>`, typed for our actions and subjects. */
export const Can = CaslCan as (props: CanProps<AppAbility>) => ReactNode;

/**
 * True when the ability allows `action` on every `subjectType`, not only on some
 * (`can('update', 'User')` with no conditions: the admin, not a member editing themself).
 * Walks the rules in CASL's priority order; the first rule without conditions decides.
 */
export function canOnEvery(ability: AppAbility, action: Action, subjectType: SubjectName): boolean {
  for (const rule of ability.rulesFor(action, subjectType)) {
    const limited = Boolean(rule.conditions) || Boolean(rule.fields);
    if (rule.inverted) return false;
    if (!limited) return true;
  }
  return false;
}
