import type { AppAbility, Action, SubjectName } from '../../shared/permissions/ability.ts';

/**
 * True when the ability allows `action` on every `subject`, not just some (a rule without conditions).
 * List endpoints use it to decide whether to repeat a rule's condition as a SQL filter.
 */
export function canAll(ability: AppAbility, action: Action, subjectName: SubjectName): boolean {
  return ability.rulesFor(action, subjectName).some((r) => !r.inverted && !r.conditions);
}
