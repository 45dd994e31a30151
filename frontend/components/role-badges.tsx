import { roleLabels, roles as roleOrder, type Role } from '../../shared/permissions/roles.ts';
import { Badge } from '@/components/ui/badge';
import { cn } from '@/utils/cn';

export interface RoleBadgesProps {
  roles: readonly Role[];
  className?: string;
}

/** A person's roles, always in the same order, with our labels. */
export const RoleBadges = ({ roles, className }: RoleBadgesProps) => {
  const held = roleOrder.filter((role) => roles.includes(role));
  if (held.length === 0) return <span className="text-ink-muted">No role</span>;
  return (
    <ul className={cn('flex flex-wrap gap-1', className)} aria-label="Roles">
      {held.map((role) => (
        <li key={role}>
          <Badge tone="neutral">{roleLabels[role]}</Badge>
        </li>
      ))}
    </ul>
  );
};
